-- Facility catalog, its history, stored plans and store metadata.
CREATE TABLE facilities (
    id      TEXT PRIMARY KEY,
    version INTEGER NOT NULL CHECK (version >= 1),
    deleted INTEGER NOT NULL DEFAULT 0 CHECK (deleted IN (0, 1))
);

CREATE TABLE facility_versions (
    facility_id TEXT NOT NULL REFERENCES facilities (id),
    version     INTEGER NOT NULL CHECK (version >= 1),
    action      TEXT NOT NULL CHECK (action IN ('create', 'update', 'delete')),
    actor       TEXT NOT NULL,
    fields      TEXT NOT NULL,
    body        TEXT,
    at_us       INTEGER NOT NULL,
    PRIMARY KEY (facility_id, version)
);

CREATE TABLE plans (
    id               TEXT PRIMARY KEY,
    facility_id      TEXT NOT NULL,
    facility_version INTEGER NOT NULL,
    body             BLOB NOT NULL,
    created_us       INTEGER NOT NULL
);

CREATE INDEX plans_facility ON plans (facility_id, facility_version);

CREATE TABLE store_meta (
    key   TEXT PRIMARY KEY,
    value TEXT NOT NULL
);
