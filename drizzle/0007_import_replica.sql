-- The direct way of the bulk import (src/lib/server/import/run.ts) COPYs a new file's readings
-- with session_replication_role = replica, the setting pg_restore --disable-triggers and logical
-- replication use to load rows without firing each row's foreign-key checks: three lookups per
-- reading (head, batch, instrument) were half of the database's work in a bulk load. The import
-- checks the same keys itself, for the whole batch in one query, before it commits; scripts/pg.sh
-- lets lapmark_import (and no other role) SET the parameter.
--
-- In replica mode only triggers marked ALWAYS fire. The summaries (0004) must follow every write to
-- readings, whoever makes it and in whatever mode, so their triggers are marked ALWAYS.
ALTER TABLE readings ENABLE ALWAYS TRIGGER readings_stats_insert;
--> statement-breakpoint
ALTER TABLE readings ENABLE ALWAYS TRIGGER readings_stats_delete;
--> statement-breakpoint
ALTER TABLE readings ENABLE ALWAYS TRIGGER readings_stats_update;
--> statement-breakpoint
ALTER TABLE readings ENABLE ALWAYS TRIGGER readings_stats_truncate;
