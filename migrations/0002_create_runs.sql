-- Evaluation runs: immutable records of every test, chained by hashes.
CREATE TABLE runs (
  run_id               INTEGER PRIMARY KEY,
  created_at           TEXT NOT NULL,
  engine_version       TEXT NOT NULL,
  strategy             TEXT NOT NULL,
  benchmark            TEXT NOT NULL,
  rate                 TEXT NOT NULL,
  factors              TEXT,
  study                TEXT,
  note                 TEXT,
  revises_run_id       INTEGER REFERENCES runs (run_id),
  parameters_json      TEXT NOT NULL,
  inputs_hash          TEXT NOT NULL CHECK (length(inputs_hash) = 64),
  frequency            TEXT NOT NULL CHECK (frequency IN ('daily', 'weekly', 'monthly', 'quarterly')),
  first_period         TEXT NOT NULL,
  last_period          TEXT NOT NULL,
  observations         INTEGER NOT NULL,
  dropped_periods      INTEGER NOT NULL,
  errors               TEXT NOT NULL,
  lags                 INTEGER NOT NULL,
  alpha                REAL NOT NULL,
  alpha_std_error      REAL NOT NULL,
  alpha_t              REAL,
  alpha_p              REAL,
  alpha_annualized     REAL NOT NULL,
  beta                 REAL NOT NULL,
  beta_t               REAL,
  r_squared            REAL,
  result_json          TEXT NOT NULL,
  previous_record_hash TEXT NOT NULL CHECK (length(previous_record_hash) = 64),
  record_hash          TEXT NOT NULL CHECK (length(record_hash) = 64)
);
CREATE INDEX runs_by_strategy ON runs (strategy, run_id);
CREATE INDEX runs_by_study ON runs (study, run_id);
CREATE INDEX runs_by_inputs_hash ON runs (inputs_hash);

CREATE TABLE run_inputs (
  run_id       INTEGER NOT NULL REFERENCES runs (run_id),
  role         TEXT NOT NULL CHECK (role IN ('strategy', 'benchmark', 'rate', 'factor')),
  position     INTEGER NOT NULL,
  version_id   INTEGER NOT NULL REFERENCES series_versions (version_id),
  columns      TEXT NOT NULL,
  PRIMARY KEY (run_id, role, position)
);
CREATE INDEX run_inputs_by_version ON run_inputs (version_id);

CREATE TABLE run_coefficients (
  run_id    INTEGER NOT NULL REFERENCES runs (run_id),
  position  INTEGER NOT NULL,
  term      TEXT NOT NULL,
  estimate  REAL NOT NULL,
  std_error REAL NOT NULL,
  t_stat    REAL,
  p_value   REAL,
  ci_low    REAL,
  ci_high   REAL,
  PRIMARY KEY (run_id, position)
);

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
