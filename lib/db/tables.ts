/*
 * Row types of the tables, registered with knex so `db("users")` is typed everywhere.
 * Later migrations add their tables here (or in a `tables.ts` of their own under lib/db).
 */
import type { Knex } from "knex";
import type { Role } from "@/lib/auth/roles";

export type UserRow = {
  id: string;
  email: string;
  display_name: string;
  password_hash: string;
  created_at: Date;
};

export type UserSessionRow = { id: string; user_id: string; expires_at: Date };

export type ResearchGroupRow = { id: number; name: string; created_at: Date };

export type MembershipRow = { user_id: string; group_id: number; role: Role; created_at: Date };

export type SiteRow = {
  id: number;
  group_id: number;
  name: string;
  latitude: number;
  longitude: number;
  elevation_m: number;
  measurement_height_m: number;
  canopy_height_m: number;
  displacement_height_m: number | null;
  utc_offset_hours: number;
  notes: string | null;
  /** the rule set whose labels the site shows (migration 20261203000200) */
  active_rule_set_id: number | null;
  created_at: Date;
  updated_at: Date;
};

export type AuditLogRow = {
  id: number;
  group_id: number | null;
  user_id: string | null;
  action: string;
  entity_type: string;
  entity_id: string;
  /** JSON text on write; mysql2 parses JSON columns on read */
  detail: unknown;
  created_at: Date;
};

export type SignInAttemptRow = { id: number; email: string; ip: string; succeeded: boolean | 0 | 1; created_at: Date };

/** Columns filled by the database (auto ids, defaults) are optional on insert. */
type Table<Row, Generated extends keyof Row> = Knex.CompositeTableType<
  Row,
  Omit<Row, Generated> & Partial<Pick<Row, Generated>>,
  Partial<Omit<Row, "id">>
>;

declare module "knex/types/tables" {
  interface Tables {
    users: Table<UserRow, "created_at">;
    user_sessions: Table<UserSessionRow, never>;
    research_groups: Table<ResearchGroupRow, "id" | "created_at">;
    memberships: Table<MembershipRow, "created_at">;
    sites: Table<SiteRow, "id" | "created_at" | "updated_at" | "notes" | "displacement_height_m" | "active_rule_set_id">;
    audit_log: Table<AuditLogRow, "id" | "created_at" | "detail">;
    sign_in_attempts: Table<SignInAttemptRow, "id" | "created_at">;
  }
}
