import { Router, type Request, type Response } from "express";
import { z } from "zod";
import { deviceTimeOf } from "../middleware/device-time";
import type { Role } from "../../src/domain/vocab";
import {
  budgetBody,
  createStageBody,
  deEnergiseBody,
  incidentBody,
  moveBody,
  operationBody,
  patchStageBody,
  patchStepBody,
  qualifiedBody,
  restartBody,
  settingsBody,
  signBody,
  stepBody,
  supersedeBody,
  watchCheckBody,
} from "../../src/schemas/return-to-service";
import type { Db } from "../db";
import { AppError } from "../errors";
import { idempotent } from "../idempotency/middleware";
import { requireSiteRole } from "../middleware/roles";
import { siteToday } from "../sites/reads";
import * as service from "./service";
import { boardView, loadSettings } from "./view";

const site = z.object({ siteId: z.uuid() });
const boardP = site.extend({ boardId: z.uuid({ message: "boardId must be a UUID" }) });
const stageP = site.extend({ stageId: z.uuid({ message: "stageId must be a UUID" }) });
const stepP = site.extend({ stepId: z.uuid({ message: "stepId must be a UUID" }) });
const signoffP = site.extend({ signoffId: z.uuid({ message: "signoffId must be a UUID" }) });
const userP = site.extend({ userId: z.uuid() });
const componentP = site.extend({ componentId: z.uuid() });

const ctxOf = (req: Request, res: Response): service.Ctx => ({
  siteId: site.parse(req.params).siteId,
  actor: { id: res.locals.user!.id, role: res.locals.siteRole as Role | "admin" },
});

/**
 * Return to service under /api/sites/:siteId. Who may do what comes from the permission table
 * (src/domain/permissions.ts, the `rts.*` actions); the services check it again (and the
 * qualified-person rule for energise and release hold points).
 */
export function rtsRoutes(db: Db) {
  const r = Router();
  const base = "/sites/:siteId/return-to-service";

  const stageAnswer = async (req: Request, res: Response, status = 200) => {
    const { siteId, stageId } = stageP.parse(req.params);
    res.status(status).json({ stage: await service.stageOf(db, siteId, stageId) });
  };

  r.get(base, requireSiteRole(db, "rts.read"), async (req, res) => {
    const { siteId } = site.parse(req.params);
    const boards = await service.siteOverview(db, siteId);
    res.json({ boards });
  });

  r.get(`${base}/settings`, requireSiteRole(db, "rts.read"), async (req, res) =>
    res.json({ settings: await loadSettings(db, site.parse(req.params).siteId) }),
  );
  r.put(`${base}/settings`, requireSiteRole(db, "rts.plan"), async (req, res) =>
    res.json({ settings: await service.saveSettings(db, ctxOf(req, res), settingsBody.parse(req.body)) }),
  );

  // Qualified persons (the crew page): every member reads, the curator edits.
  r.get(`${base}/qualified-persons`, requireSiteRole(db, "rts.read"), async (req, res) => {
    const { siteId } = site.parse(req.params);
    res.json({ people: await service.qualifiedCrew(db, siteId, await siteToday(db, siteId)) });
  });
  r.put(`${base}/qualified-persons/:userId`, requireSiteRole(db, "rts.manage_qualified"), async (req, res) => {
    const { userId } = userP.parse(req.params);
    const ctx = ctxOf(req, res);
    const body = qualifiedBody.parse(req.body);
    res.json({ person: await service.saveQualified(db, ctx, userId, body, await siteToday(db, ctx.siteId)) });
  });
  r.delete(`${base}/qualified-persons/:userId`, requireSiteRole(db, "rts.manage_qualified"), async (req, res) => {
    await service.removeQualified(db, ctxOf(req, res), userP.parse(req.params).userId);
    res.status(204).end();
  });

  // The board's plan, gate, log and breakers.
  r.get("/sites/:siteId/boards/:boardId/return-to-service", requireSiteRole(db, "rts.read"), async (req, res) => {
    const { siteId, boardId } = boardP.parse(req.params);
    res.json(await boardView(db, siteId, boardId, new Date()));
  });
  r.post(
    "/sites/:siteId/boards/:boardId/return-to-service/stages",
    requireSiteRole(db, "rts.plan"),
    async (req, res) => {
      const { boardId } = boardP.parse(req.params);
      const s = await service.createStage(db, ctxOf(req, res), boardId, createStageBody.parse(req.body));
      req.params.stageId = s.id;
      await stageAnswer(req, res, 201);
    },
  );

  const stage = `${base}/stages/:stageId`;
  r.get(stage, requireSiteRole(db, "rts.read"), async (req, res) => stageAnswer(req, res));
  r.patch(stage, requireSiteRole(db, "rts.plan"), async (req, res) => {
    await service.patchStage(db, ctxOf(req, res), stageP.parse(req.params).stageId, patchStageBody.parse(req.body));
    await stageAnswer(req, res);
  });
  r.delete(stage, requireSiteRole(db, "rts.plan"), async (req, res) => {
    await service.deleteStage(db, ctxOf(req, res), stageP.parse(req.params).stageId);
    res.status(204).end();
  });
  r.post(`${stage}/move`, requireSiteRole(db, "rts.plan"), async (req, res) => {
    res.json({
      order: await service.moveStage(
        db,
        ctxOf(req, res),
        stageP.parse(req.params).stageId,
        moveBody.parse(req.body).toIndex,
      ),
    });
  });
  r.post(`${stage}/steps`, requireSiteRole(db, "rts.plan"), async (req, res) => {
    await service.addStep(db, ctxOf(req, res), stageP.parse(req.params).stageId, stepBody.parse(req.body));
    await stageAnswer(req, res, 201);
  });
  r.post(`${stage}/watch-checks`, requireSiteRole(db, "rts.record_watch"), idempotent(db), async (req, res) => {
    res
      .status(201)
      .json(
        await service.recordWatchCheck(
          db,
          ctxOf(req, res),
          stageP.parse(req.params).stageId,
          watchCheckBody.parse(req.body),
          new Date(),
          deviceTimeOf(req),
        ),
      );
  });
  r.post(`${stage}/incidents`, requireSiteRole(db, "rts.record_incident"), idempotent(db), async (req, res) => {
    res.status(201).json({
      incident: await service.recordIncident(
        db,
        ctxOf(req, res),
        stageP.parse(req.params).stageId,
        incidentBody.parse(req.body),
      ),
    });
  });
  r.post(`${stage}/de-energise`, requireSiteRole(db, "rts.de_energise"), async (req, res) => {
    await service.deEnergise(db, ctxOf(req, res), stageP.parse(req.params).stageId, deEnergiseBody.parse(req.body));
    await stageAnswer(req, res, 201);
  });
  r.post(`${stage}/restart`, requireSiteRole(db, "rts.restart"), async (req, res) => {
    await service.restart(db, ctxOf(req, res), stageP.parse(req.params).stageId, restartBody.parse(req.body));
    await stageAnswer(req, res);
  });

  const step = `${base}/steps/:stepId`;
  r.patch(step, requireSiteRole(db, "rts.plan"), async (req, res) =>
    res.json({
      step: await service.patchStep(db, ctxOf(req, res), stepP.parse(req.params).stepId, patchStepBody.parse(req.body)),
    }),
  );
  r.delete(step, requireSiteRole(db, "rts.plan"), async (req, res) => {
    await service.deleteStep(db, ctxOf(req, res), stepP.parse(req.params).stepId);
    res.status(204).end();
  });
  r.post(`${step}/move`, requireSiteRole(db, "rts.plan"), async (req, res) =>
    res.json({
      order: await service.moveStep(
        db,
        ctxOf(req, res),
        stepP.parse(req.params).stepId,
        moveBody.parse(req.body).toIndex,
      ),
    }),
  );
  r.post(`${step}/signoffs`, requireSiteRole(db, "rts.sign"), async (req, res) => {
    res.status(201).json({
      stage: await service.sign(db, ctxOf(req, res), stepP.parse(req.params).stepId, signBody.parse(req.body)),
    });
  });

  // Signatures are never edited nor deleted: a correction is a new entry that supersedes.
  const signoff = `${base}/signoffs/:signoffId`;
  r.post(`${signoff}/supersede`, requireSiteRole(db, "rts.sign"), async (req, res) => {
    res.status(201).json({
      stage: await service.supersede(
        db,
        ctxOf(req, res),
        signoffP.parse(req.params).signoffId,
        supersedeBody.parse(req.body),
      ),
    });
  });
  r.all(signoff, requireSiteRole(db, "rts.read"), (req, res) => {
    signoffP.parse(req.params);
    if (req.method === "GET" || req.method === "HEAD")
      throw new AppError(404, "not_found", "Signatures are read with their stage.");
    res.setHeader("Allow", "GET");
    res.status(405).json({
      error: {
        code: "immutable",
        message: "A signature cannot be changed or deleted. Correct it with a new entry that supersedes it.",
      },
    });
  });

  // Breaker operations and budgets.
  r.post(
    "/sites/:siteId/components/:componentId/breaker-operations",
    requireSiteRole(db, "rts.record_operation"),
    idempotent(db),
    async (req, res) => {
      res
        .status(201)
        .json(
          await service.recordOperation(
            db,
            ctxOf(req, res),
            componentP.parse(req.params).componentId,
            operationBody.parse(req.body),
          ),
        );
    },
  );
  r.put(
    "/sites/:siteId/components/:componentId/operations-budget",
    requireSiteRole(db, "rts.set_budget"),
    async (req, res) => {
      res.json({
        budget: await service.setBudget(
          db,
          ctxOf(req, res),
          componentP.parse(req.params).componentId,
          budgetBody.parse(req.body),
        ),
      });
    },
  );
  return r;
}
