/**
 * A board's latest ground-lamp check, in a module of its own with only its schema (src/schemas/ground-check.ts):
 * the board page starts this read as it opens (its route's loader), before the card that shows it, and the rest of
 * the readings' code, have arrived, so the check is kept for no signal with the board.
 */
import { queryOptions, useQuery } from "@tanstack/react-query";
import { z } from "zod";
import { api } from "../../lib/api-client";
import { groundCheckSchema } from "../../schemas/ground-check";
import { readingKeys } from "./keys";

const latestGroundCheckUrl = (siteId: string, boardId: string) =>
  `/api/sites/${siteId}/boards/${boardId}/ground-checks/latest`;

export const latestGroundQueryOptions = (siteId: string, boardId: string) =>
  queryOptions({
    queryKey: readingKeys.latestGround(siteId, boardId),
    queryFn: ({ signal }) =>
      api
        .get(latestGroundCheckUrl(siteId, boardId), z.object({ check: groundCheckSchema.nullable() }), signal)
        .then((d) => d.check),
  });

export const useLatestGroundCheck = (siteId: string, boardId: string) =>
  useQuery(latestGroundQueryOptions(siteId, boardId));
