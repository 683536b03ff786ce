import type { Role } from "../../domain/vocab";

type SiteRole = Role | "admin";
/** Mirrors the server's rules so the screen hides what a role cannot do (the server still guards). */
export const canCurate = (r: SiteRole) => r === "curator" || r === "admin";
export const canLog = (r: SiteRole) => r === "curator" || r === "admin" || r === "volunteer";
