-- Marks that say what a ledger is for, one row each, added once and never changed: the demo
-- marks the ledgers it builds ('demo'), so that `demo --replace` can tell its own ledger
-- from a user's and never replaces anything else.
CREATE TABLE ledger_marks (
  mark      TEXT PRIMARY KEY,  -- what the mark says, e.g. 'demo'
  detail    TEXT NOT NULL,     -- free text, e.g. the demo's seed
  marked_at TEXT NOT NULL      -- UTC ISO 8601 with milliseconds
);

CREATE TRIGGER ledger_marks_no_update BEFORE UPDATE ON ledger_marks
BEGIN SELECT RAISE(ABORT, 'ledger marks are immutable'); END;
CREATE TRIGGER ledger_marks_no_delete BEFORE DELETE ON ledger_marks
BEGIN SELECT RAISE(ABORT, 'ledger marks are immutable'); END;
