-- pbfleet schema for PostgreSQL, version 5 (same number as
-- schema/0005_newest_trusted_fast.sql). That migration rewrites a SQLite
-- row trigger; PostgreSQL keeps its summaries with the statement-level
-- triggers of version 4, which need no change. The version is recorded so
-- both stores carry the same schema numbers.
SELECT 1;
