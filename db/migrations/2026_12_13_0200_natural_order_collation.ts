import { Kysely, sql } from "kysely";

// Designations and board names hold numbers ("Q9", "Q10", "F2.10", "MSB 2"): compared as text, "Q10" comes before
// "Q9". This collation is ICU's root collation with numeric ordering (the Unicode locale extension "kn", UTS #35),
// so runs of digits compare by their value: Q9 < Q10, F2.9 < F2.10. The wanted list's queries name it with COLLATE
// (server/parts/repository.ts); no column takes it as its default, so indexes and other reads keep theirs. It is
// deterministic (the default), so two texts that ICU ranks equal ("Q1", "Q01") still compare by their bytes and the
// order is total. Debian's PostgreSQL 15 is built with ICU (libicu72); so are the managed services'. Frozen in time:
// never import app code here.

export async function up(db: Kysely<any>): Promise<void> {
  await sql`CREATE COLLATION IF NOT EXISTS numbers_by_value (provider = icu, locale = 'und-u-kn-true')`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP COLLATION IF EXISTS numbers_by_value`.execute(db);
}
