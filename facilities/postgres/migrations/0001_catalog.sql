-- Facility catalog, its history, stored plans and store metadata.
CREATE TABLE facilities (
    id      text PRIMARY KEY,
    version integer NOT NULL CHECK (version >= 1),
    deleted boolean NOT NULL DEFAULT false
);

CREATE TABLE facility_versions (
    facility_id text NOT NULL REFERENCES facilities (id),
    version     integer NOT NULL CHECK (version >= 1),
    action      text NOT NULL CHECK (action IN ('create', 'update', 'delete')),
    actor       text NOT NULL,
    fields      jsonb NOT NULL,
    body        jsonb,
    at          timestamptz NOT NULL,
    PRIMARY KEY (facility_id, version)
);

CREATE TABLE plans (
    id               text PRIMARY KEY,
    facility_id      text NOT NULL,
    facility_version integer NOT NULL,
    body             bytea NOT NULL,
    created_at       timestamptz NOT NULL
);

CREATE INDEX plans_facility ON plans (facility_id, facility_version);

CREATE TABLE store_meta (
    key   text PRIMARY KEY,
    value text NOT NULL
);
