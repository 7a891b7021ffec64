-- Saved plan result and the project's own part library.

-- The last plan result (JSON of PlanResult) and the requirements revision it was computed
-- from; it is stale when the project's revision has moved on.
CREATE TABLE plan_results (
  slot        INTEGER PRIMARY KEY CHECK (slot = 1),
  revision    INTEGER NOT NULL,
  computed_at TEXT NOT NULL,
  result      TEXT NOT NULL
);

-- Part library rows; `params` is an opaque JSON object whose meaning the BOM defines.
CREATE TABLE part_library (
  id         TEXT PRIMARY KEY,
  pos        INTEGER NOT NULL,
  part_class TEXT NOT NULL,
  name       TEXT NOT NULL,
  cost       REAL NOT NULL,
  params     TEXT NOT NULL DEFAULT '{}'
);
