-- Requirements of a project: what the engineer enters. Quantities in base SI units.
-- `pos` keeps the user's order; `extra` holds fields added to the model after this schema
-- (a JSON object), so newer model fields survive a round trip through older columns.

CREATE TABLE meta (
  key   TEXT PRIMARY KEY,
  value TEXT NOT NULL
);

CREATE TABLE sources (
  id            TEXT PRIMARY KEY,
  pos           INTEGER NOT NULL,
  name          TEXT NOT NULL,
  v_nom         REAL NOT NULL,
  v_min         REAL NOT NULL,
  v_max         REAL NOT NULL,
  current_limit REAL NOT NULL,
  extra         TEXT NOT NULL DEFAULT '{}'
);

CREATE TABLE domains (
  id              TEXT PRIMARY KEY,
  pos             INTEGER NOT NULL,
  name            TEXT NOT NULL,
  isolation       TEXT NOT NULL,
  working_voltage REAL NOT NULL,
  extra           TEXT NOT NULL DEFAULT '{}'
);

CREATE TABLE modes (
  id    TEXT PRIMARY KEY,
  pos   INTEGER NOT NULL,
  name  TEXT NOT NULL,
  share REAL NOT NULL,
  extra TEXT NOT NULL DEFAULT '{}'
);

CREATE TABLE loads (
  id           TEXT PRIMARY KEY,
  pos          INTEGER NOT NULL,
  name         TEXT NOT NULL,
  domain_id    TEXT NOT NULL,
  voltage      REAL NOT NULL,
  tolerance    REAL NOT NULL,
  ripple_limit REAL NOT NULL,
  noise_class  TEXT NOT NULL,
  rail_key     TEXT,
  extra        TEXT NOT NULL DEFAULT '{}'
);

-- Current of a load in one operating mode; a missing row means 0 A in that mode.
CREATE TABLE load_currents (
  load_id TEXT NOT NULL REFERENCES loads(id) ON DELETE CASCADE,
  mode_id TEXT NOT NULL,
  pos     INTEGER NOT NULL,
  current REAL NOT NULL,
  PRIMARY KEY (load_id, mode_id)
);

-- Design limits, one row per field of DesignLimits (value is JSON).
CREATE TABLE limits (
  key   TEXT PRIMARY KEY,
  value TEXT NOT NULL
);

-- Planner preferences, one row per field of PlannerPreferences (value is JSON).
CREATE TABLE preferences (
  key   TEXT PRIMARY KEY,
  value TEXT NOT NULL
);
