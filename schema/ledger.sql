-- alphatrail ledger schema, current version (PRAGMA user_version = 7,
-- PRAGMA application_id = 0x4154524C, "ATRL").
--
-- This file is the reference for people who query a ledger with SQL. It is kept equal to
-- what migrations/ build (a test compares the two, ignoring comments and white space).
-- Every table is append-only: triggers abort any UPDATE or DELETE. Dates are ISO 8601 text
-- (YYYY-MM-DD); times are UTC ISO 8601 with milliseconds (2026-12-02T01:02:03.004Z);
-- hashes are SHA-256 as 64 lowercase hex digits.

-- One row per named series: a strategy or a benchmark (one column of returns), a factor
-- set (one column per factor) or a rate curve (one column per tenor).
CREATE TABLE series (
  series_id  INTEGER PRIMARY KEY,  -- internal key
  name       TEXT NOT NULL UNIQUE, -- the name used on the command line
  kind       TEXT NOT NULL CHECK (kind IN ('strategy', 'benchmark', 'rate', 'factor')),
  created_at TEXT NOT NULL         -- when the first version was ingested
);

-- One row per version of a series. An ingest whose content differs from the latest version
-- adds version n + 1; identical content adds nothing.
CREATE TABLE series_versions (
  version_id    INTEGER PRIMARY KEY,  -- internal key, referenced by run inputs
  series_id     INTEGER NOT NULL REFERENCES series (series_id),
  version       INTEGER NOT NULL CHECK (version >= 1),  -- 1, 2, 3 ... per series
  -- SHA-256 over the canonical content: kind, unit, quote, then each column's name and
  -- values_json (see version_columns); recomputed by `alphatrail verify`.
  content_hash  TEXT NOT NULL CHECK (length(content_hash) = 64),
  -- What the stored numbers are: simple returns as decimals (strategy, benchmark, factor),
  -- or annualized yields in percent or decimals as the file stated them (rate).
  unit          TEXT NOT NULL CHECK (unit IN ('decimal return', 'percent yield', 'decimal yield')),
  -- How the source file stated its values: decimal or percent returns, or levels (prices,
  -- NAV, index levels) from which returns were derived; rates: percent or decimal.
  input_unit    TEXT NOT NULL CHECK (input_unit IN ('decimal', 'percent', 'levels')),
  quote         TEXT CHECK (quote IN ('yield', 'discount')),  -- rates: yield or bank discount
  frequency     TEXT CHECK (frequency IN ('daily', 'weekly', 'monthly', 'quarterly')),  -- detected; NULL: irregular
  first_date    TEXT NOT NULL,        -- first observation date
  last_date     TEXT NOT NULL,        -- last observation date
  observations  INTEGER NOT NULL CHECK (observations >= 1),  -- dated rows
  missing       INTEGER NOT NULL CHECK (missing >= 0),       -- missing values inside the columns
  source_file   TEXT NOT NULL,        -- the file as named on the command line
  source_sha256 TEXT NOT NULL CHECK (length(source_sha256) = 64),  -- of the file's bytes
  ingested_at   TEXT NOT NULL,        -- UTC time of the ingest
  ingested_by   TEXT NOT NULL,        -- the user who ran it
  note          TEXT,                 -- --note, or NULL
  UNIQUE (series_id, version)
);

-- The observations of a version, one row per column (a factor of a set, a tenor of a
-- curve, or the single column of a strategy or benchmark). values_json is the canonical
-- text {"YYYY-MM-DD": value, ...}, dates ascending, null for a missing value, numbers in
-- their shortest round-trip form. Read it row by row through the observations view.
CREATE TABLE version_columns (
  column_id    INTEGER PRIMARY KEY,
  version_id   INTEGER NOT NULL REFERENCES series_versions (version_id),
  position     INTEGER NOT NULL CHECK (position >= 1),  -- order of the column in the file
  column_name  TEXT NOT NULL,                            -- factor name, tenor, or series name
  values_json  TEXT NOT NULL,
  UNIQUE (version_id, position),
  UNIQUE (version_id, column_name)
);
-- A version's columns in file order with their names, read from the index alone: listing
-- them does not read the rows, each of which holds the whole JSON text of its observations.
CREATE INDEX version_columns_in_order ON version_columns (version_id, position, column_name);

-- A packed binary copy of a column's observations, kept only so that loading is fast: days as
-- little-endian 32-bit day numbers (days since 1970-01-01), numbers as little-endian IEEE 754
-- doubles (NaN for a missing value), the same n observations as values_json in the same
-- order. values_json stays the canonical form that content_hash covers; `alphatrail verify`
-- checks that every packed copy equals it. Columns stored before schema version 5 have no
-- packed row. To read observations with SQL, use values_json or the observations view.
CREATE TABLE packed_columns (
  column_id INTEGER PRIMARY KEY REFERENCES version_columns (column_id),
  days      BLOB NOT NULL,  -- n x 4 bytes
  numbers   BLOB NOT NULL,  -- n x 8 bytes
  CHECK (length(days) % 4 = 0 AND length(numbers) = 2 * length(days))
);

-- Every observation of every version: series name, kind, version number, column, date and
-- value (NULL when missing). Filter on series and version for speed.
CREATE VIEW observations AS
SELECT s.name AS series, s.kind AS kind, v.version AS version, c.column_name AS column_name,
       o.key AS date, o.value AS value
FROM series AS s
JOIN series_versions AS v ON v.series_id = s.series_id
JOIN version_columns AS c ON c.version_id = v.version_id,
     json_each(c.values_json) AS o;

-- Immutability: versions are numbered without gaps; nothing is ever updated or deleted.
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
CREATE TRIGGER packed_columns_no_update BEFORE UPDATE ON packed_columns
BEGIN SELECT RAISE(ABORT, 'observations are immutable: ingest a new version instead'); END;
CREATE TRIGGER packed_columns_no_delete BEFORE DELETE ON packed_columns
BEGIN SELECT RAISE(ABORT, 'observations are never deleted: the ledger keeps every revision'); END;

-- One row per evaluation: an immutable record of one strategy tested against a benchmark,
-- a risk-free rate and optional factors. Headline figures are copied out of result_json so
-- that plain SQL can filter and sort on them.
CREATE TABLE runs (
  run_id               INTEGER PRIMARY KEY,  -- 1, 2, 3 ... in the order runs were recorded
  created_at           TEXT NOT NULL,        -- UTC time of recording
  engine_version       TEXT NOT NULL,        -- alphatrail version that computed the result
  strategy             TEXT NOT NULL,        -- strategy series name
  benchmark            TEXT NOT NULL,        -- benchmark series name
  rate                 TEXT NOT NULL,        -- rate curve and tenor, 'curve:1M'
  factors              TEXT,                 -- 'set:col,col; set2:col', NULL for the single-index model
  study                TEXT,                 -- --study: the family of variants this run is a trial of
  note                 TEXT,                 -- --note
  revises_run_id       INTEGER REFERENCES runs (run_id),  -- the run this one re-evaluates after a data revision
  parameters_json      TEXT NOT NULL,        -- every parameter, defaults written out, canonical JSON (sorted keys)
  -- SHA-256 over the engine version, parameters_json and each input version's role,
  -- series, version and content hash: equal inputs hashes mean bit-identical results.
  inputs_hash          TEXT NOT NULL CHECK (length(inputs_hash) = 64),
  frequency            TEXT NOT NULL CHECK (frequency IN ('daily', 'weekly', 'monthly', 'quarterly')),  -- evaluation frequency
  first_period         TEXT NOT NULL,        -- first period of the sample used, e.g. '2000-01'
  last_period          TEXT NOT NULL,        -- last period of the sample used
  observations         INTEGER NOT NULL,     -- T, periods in the regression
  dropped_periods      INTEGER NOT NULL,     -- periods dropped because an input was missing or out of range
  errors               TEXT NOT NULL,        -- standard errors: classic, hc0, hc1, hc2, hc3, newey-west
  lags                 INTEGER NOT NULL,     -- Newey-West lags used (0 for other kinds)
  alpha                REAL NOT NULL,        -- intercept: decimal return per period
  alpha_std_error      REAL NOT NULL,        -- its standard error under `errors`
  alpha_t              REAL,                 -- its t statistic
  alpha_p              REAL,                 -- two-sided p-value, Student t with T - k degrees of freedom
  alpha_annualized     REAL NOT NULL,        -- decimal per year, compound or arithmetic as parameters say
  beta                 REAL NOT NULL,        -- slope on the benchmark's excess return
  beta_t               REAL,                 -- its t statistic
  r_squared            REAL,                 -- R-squared of the regression
  result_json          TEXT NOT NULL,        -- sample, coefficients, statistics, reading, preparation, warnings, rolling
  previous_record_hash TEXT NOT NULL CHECK (length(previous_record_hash) = 64),  -- record_hash of the run before (zeros for run 1)
  record_hash          TEXT NOT NULL CHECK (length(record_hash) = 64)  -- SHA-256 of previous_record_hash and this run's canonical record
);
CREATE INDEX runs_by_strategy ON runs (strategy, run_id);
CREATE INDEX runs_by_study ON runs (study, run_id);
CREATE INDEX runs_by_inputs_hash ON runs (inputs_hash);

-- The input versions of each run and their roles.
CREATE TABLE run_inputs (
  run_id       INTEGER NOT NULL REFERENCES runs (run_id),
  role         TEXT NOT NULL CHECK (role IN ('strategy', 'benchmark', 'rate', 'factor')),
  position     INTEGER NOT NULL,  -- order among inputs of the same role (factor sets)
  version_id   INTEGER NOT NULL REFERENCES series_versions (version_id),  -- the exact version used
  columns      TEXT NOT NULL,     -- columns used, comma-separated: the tenor, the factors
  PRIMARY KEY (run_id, role, position)
);
CREATE INDEX run_inputs_by_version ON run_inputs (version_id);

-- Every coefficient of each run: alpha, beta, then one per factor.
CREATE TABLE run_coefficients (
  run_id    INTEGER NOT NULL REFERENCES runs (run_id),
  position  INTEGER NOT NULL,  -- 1 alpha, 2 beta, 3... factors
  term      TEXT NOT NULL,     -- 'alpha', 'beta' or the factor name
  estimate  REAL NOT NULL,
  std_error REAL NOT NULL,     -- under the run's `errors`
  t_stat    REAL,
  p_value   REAL,              -- two-sided, Student t with T - k degrees of freedom
  ci_low    REAL,              -- confidence interval at parameters.confidence
  ci_high   REAL,
  PRIMARY KEY (run_id, position)
);

-- Immutability of runs.
CREATE TRIGGER runs_no_update BEFORE UPDATE ON runs
BEGIN SELECT RAISE(ABORT, 'runs are immutable: evaluate again to record a new run'); END;
CREATE TRIGGER runs_no_delete BEFORE DELETE ON runs
BEGIN SELECT RAISE(ABORT, 'runs are never deleted: the ledger keeps every test'); END;
CREATE TRIGGER run_inputs_no_update BEFORE UPDATE ON run_inputs
BEGIN SELECT RAISE(ABORT, 'run inputs are immutable'); END;
CREATE TRIGGER run_inputs_no_delete BEFORE DELETE ON run_inputs
BEGIN SELECT RAISE(ABORT, 'run inputs are never deleted'); END;
CREATE TRIGGER run_coefficients_no_update BEFORE UPDATE ON run_coefficients
BEGIN SELECT RAISE(ABORT, 'run coefficients are immutable'); END;
CREATE TRIGGER run_coefficients_no_delete BEFORE DELETE ON run_coefficients
BEGIN SELECT RAISE(ABORT, 'run coefficients are never deleted'); END;

-- One row per run with its headline figures and whether it is stale (an input has a newer
-- version than the one the run used).
CREATE VIEW run_summary AS
SELECT r.run_id, r.created_at, r.strategy, r.benchmark, r.rate, r.factors, r.study, r.note,
       r.frequency, r.first_period, r.last_period, r.observations, r.dropped_periods,
       r.errors, r.lags, r.alpha, r.alpha_std_error, r.alpha_t, r.alpha_p,
       r.alpha_annualized, r.beta, r.beta_t, r.r_squared, r.revises_run_id, r.inputs_hash,
       EXISTS (SELECT 1 FROM run_inputs AS i
               JOIN series_versions AS v ON v.version_id = i.version_id
               JOIN series_versions AS w ON w.series_id = v.series_id AND w.version > v.version
               WHERE i.run_id = r.run_id) AS stale
FROM runs AS r;

-- The latest version of each series, set and curve.
CREATE VIEW latest_versions AS
SELECT s.name, s.kind, v.version, v.version_id, v.content_hash, v.unit, v.input_unit, v.quote,
       v.frequency, v.first_date, v.last_date, v.observations, v.missing, v.source_file,
       v.ingested_at, v.ingested_by, v.note
FROM series AS s
JOIN series_versions AS v ON v.series_id = s.series_id
WHERE v.version = (SELECT max(w.version) FROM series_versions AS w WHERE w.series_id = s.series_id);

-- The inputs of each run: role, series, the version used and the latest version there is.
CREATE VIEW run_input_versions AS
SELECT i.run_id, i.role, i.position, s.name AS series, v.version, v.content_hash, i.columns,
       (SELECT max(w.version) FROM series_versions AS w WHERE w.series_id = v.series_id) AS latest_version,
       v.source_file, v.note
FROM run_inputs AS i
JOIN series_versions AS v ON v.version_id = i.version_id
JOIN series AS s ON s.series_id = v.series_id;

-- The rolling estimates of each run recorded with --rolling, one row per window end, read
-- from result_json's "rolling" (nothing is stored twice). A window holds `observations`
-- consecutive kept periods, window_first .. window_end, so it may cross a gap in the sample.
-- alpha, its standard error and interval bounds are decimal returns per period under the
-- run's errors and confidence; alpha_annualized and its bounds follow parameters.annualize;
-- beta is the slope on the benchmark's excess return. lags: Newey-West lags of the window
-- (0 for other errors). Figures of a window that cannot be estimated are NULL.
CREATE VIEW run_windows AS
SELECT r.run_id,
       json_extract(w.value, '$.end') AS window_end,
       json_extract(w.value, '$.first') AS window_first,
       json_extract(w.value, '$.observations') AS observations,
       json_extract(w.value, '$.lags') AS lags,
       json_extract(w.value, '$.alpha') AS alpha,
       json_extract(w.value, '$.alpha_std_error') AS alpha_std_error,
       json_extract(w.value, '$.alpha_ci_low') AS alpha_ci_low,
       json_extract(w.value, '$.alpha_ci_high') AS alpha_ci_high,
       json_extract(w.value, '$.alpha_annualized') AS alpha_annualized,
       json_extract(w.value, '$.alpha_annualized_ci_low') AS alpha_annualized_ci_low,
       json_extract(w.value, '$.alpha_annualized_ci_high') AS alpha_annualized_ci_high,
       json_extract(w.value, '$.beta') AS beta,
       json_extract(w.value, '$.beta_std_error') AS beta_std_error,
       json_extract(w.value, '$.beta_ci_low') AS beta_ci_low,
       json_extract(w.value, '$.beta_ci_high') AS beta_ci_high
FROM runs AS r, json_each(r.result_json, '$.rolling.windows') AS w
WHERE w.type = 'object';

-- Marks that say what a ledger is for, one row each, added once and never changed. The demo
-- marks the ledgers it builds with 'demo' (detail: its seed), so that `demo --replace` can
-- tell its own ledger from a user's and never replaces anything else.
CREATE TABLE ledger_marks (
  mark      TEXT PRIMARY KEY,  -- what the mark says, e.g. 'demo'
  detail    TEXT NOT NULL,     -- free text, e.g. the demo's seed
  marked_at TEXT NOT NULL      -- UTC ISO 8601 with milliseconds
);

CREATE TRIGGER ledger_marks_no_update BEFORE UPDATE ON ledger_marks
BEGIN SELECT RAISE(ABORT, 'ledger marks are immutable'); END;
CREATE TRIGGER ledger_marks_no_delete BEFORE DELETE ON ledger_marks
BEGIN SELECT RAISE(ABORT, 'ledger marks are immutable'); END;
