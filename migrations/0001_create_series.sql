-- Series, their immutable versions and the observations of each version.
CREATE TABLE series (
  series_id  INTEGER PRIMARY KEY,
  name       TEXT NOT NULL UNIQUE,
  kind       TEXT NOT NULL CHECK (kind IN ('strategy', 'benchmark', 'rate', 'factor')),
  created_at TEXT NOT NULL
);

CREATE TABLE series_versions (
  version_id    INTEGER PRIMARY KEY,
  series_id     INTEGER NOT NULL REFERENCES series (series_id),
  version       INTEGER NOT NULL CHECK (version >= 1),
  content_hash  TEXT NOT NULL CHECK (length(content_hash) = 64),
  unit          TEXT NOT NULL CHECK (unit IN ('decimal return', 'percent yield', 'decimal yield')),
  input_unit    TEXT NOT NULL CHECK (input_unit IN ('decimal', 'percent', 'levels')),
  quote         TEXT CHECK (quote IN ('yield', 'discount')),
  frequency     TEXT CHECK (frequency IN ('daily', 'weekly', 'monthly', 'quarterly')),
  first_date    TEXT NOT NULL,
  last_date     TEXT NOT NULL,
  observations  INTEGER NOT NULL CHECK (observations >= 1),
  missing       INTEGER NOT NULL CHECK (missing >= 0),
  source_file   TEXT NOT NULL,
  source_sha256 TEXT NOT NULL CHECK (length(source_sha256) = 64),
  ingested_at   TEXT NOT NULL,
  ingested_by   TEXT NOT NULL,
  note          TEXT,
  UNIQUE (series_id, version)
);

CREATE TABLE version_columns (
  column_id    INTEGER PRIMARY KEY,
  version_id   INTEGER NOT NULL REFERENCES series_versions (version_id),
  position     INTEGER NOT NULL CHECK (position >= 1),
  column_name  TEXT NOT NULL,
  values_json  TEXT NOT NULL,
  UNIQUE (version_id, position),
  UNIQUE (version_id, column_name)
);

CREATE VIEW observations AS
SELECT s.name AS series, s.kind AS kind, v.version AS version, c.column_name AS column_name,
       o.key AS date, o.value AS value
FROM series AS s
JOIN series_versions AS v ON v.series_id = s.series_id
JOIN version_columns AS c ON c.version_id = v.version_id,
     json_each(c.values_json) AS o;

CREATE TRIGGER series_versions_in_sequence BEFORE INSERT ON series_versions
WHEN NEW.version <> (SELECT coalesce(max(version), 0) + 1 FROM series_versions WHERE series_id = NEW.series_id)
BEGIN SELECT RAISE(ABORT, 'series versions are numbered 1, 2, 3 ... without gaps'); END;
CREATE TRIGGER series_no_update BEFORE UPDATE ON series
BEGIN SELECT RAISE(ABORT, 'series are immutable: ingest a new version instead'); END;
CREATE TRIGGER series_no_delete BEFORE DELETE ON series
BEGIN SELECT RAISE(ABORT, 'series are never deleted: the ledger keeps every revision'); END;
CREATE TRIGGER series_versions_no_update BEFORE UPDATE ON series_versions
BEGIN SELECT RAISE(ABORT, 'series versions are immutable: ingest a new version instead'); END;
CREATE TRIGGER series_versions_no_delete BEFORE DELETE ON series_versions
BEGIN SELECT RAISE(ABORT, 'series versions are never deleted: the ledger keeps every revision'); END;
CREATE TRIGGER version_columns_no_update BEFORE UPDATE ON version_columns
BEGIN SELECT RAISE(ABORT, 'observations are immutable: ingest a new version instead'); END;
CREATE TRIGGER version_columns_no_delete BEFORE DELETE ON version_columns
BEGIN SELECT RAISE(ABORT, 'observations are never deleted: the ledger keeps every revision'); END;
