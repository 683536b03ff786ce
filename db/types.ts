/**
 * The Database interface Kysely checks every query against. Hand-kept beside the
 * migrations; property names are camelCase (CamelCasePlugin maps them to snake_case).
 */
import type { ColumnType, Generated, Selectable } from "kysely";
import type { Role } from "../src/domain/vocab";

type Timestamp = ColumnType<Date, Date | string | undefined, Date | string>;

export interface UsersTable {
  id: Generated<string>;
  email: string;
  name: string;
  passwordHash: string | null;
  isAdmin: Generated<boolean>;
  createdAt: Timestamp;
  updatedAt: Timestamp;
}

export interface SessionsTable {
  id: string;
  userId: string;
  expiresAt: ColumnType<Date, Date, Date>;
}

export interface SitesTable {
  id: Generated<string>;
  name: string;
  kind: "vessel" | "building" | "plant";
  location: Generated<string>;
  description: Generated<string>;
  createdAt: Timestamp;
}

export interface MembershipsTable {
  siteId: string;
  userId: string;
  role: Role;
  createdAt: Timestamp;
}

export interface Database {
  users: UsersTable;
  sessions: SessionsTable;
  sites: SitesTable;
  memberships: MembershipsTable;
}

export type User = Selectable<UsersTable>;
export type Site = Selectable<SitesTable>;
