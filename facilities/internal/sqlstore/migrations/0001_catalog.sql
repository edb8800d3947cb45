-- Facility catalog, its history, stored plans and store metadata.
CREATE TABLE facilities (
    id      {{.Text}} PRIMARY KEY,
    version {{.Integer}} NOT NULL CHECK (version >= 1),
    deleted {{.Deleted}}
);

CREATE TABLE facility_versions (
    facility_id {{.Text}} NOT NULL REFERENCES facilities (id),
    version     {{.Integer}} NOT NULL CHECK (version >= 1),
    action      {{.Text}} NOT NULL CHECK (action IN ('create', 'update', 'delete')),
    actor       {{.Text}} NOT NULL,
    fields      {{.JSON}} NOT NULL,
    body        {{.JSON}},
    {{.At}} {{.Instant}} NOT NULL,
    PRIMARY KEY (facility_id, version)
);

CREATE TABLE plans (
    id               {{.Text}} PRIMARY KEY,
    facility_id      {{.Text}} NOT NULL,
    facility_version {{.Integer}} NOT NULL,
    body             {{.Bytes}} NOT NULL,
    {{.Created}} {{.Instant}} NOT NULL
);

CREATE INDEX plans_facility ON plans (facility_id, facility_version);

CREATE TABLE store_meta (
    key   {{.Text}} PRIMARY KEY,
    value {{.Text}} NOT NULL
);
