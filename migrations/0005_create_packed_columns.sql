-- A packed binary copy of each column's observations, so that loading needs neither SQLite
-- to read the JSON text nor a decimal parser: the JSON in version_columns stays the
-- canonical, hashed form, and `verify` checks that the two agree. Columns stored before this
-- migration have no packed row and are read from their JSON.
CREATE TABLE packed_columns (
  column_id INTEGER PRIMARY KEY REFERENCES version_columns (column_id),
  days      BLOB NOT NULL,
  numbers   BLOB NOT NULL,
  CHECK (length(days) % 4 = 0 AND length(numbers) = 2 * length(days))
);

CREATE TRIGGER packed_columns_no_update BEFORE UPDATE ON packed_columns
BEGIN SELECT RAISE(ABORT, 'observations are immutable: ingest a new version instead'); END;
CREATE TRIGGER packed_columns_no_delete BEFORE DELETE ON packed_columns
BEGIN SELECT RAISE(ABORT, 'observations are never deleted: the ledger keeps every revision'); END;
