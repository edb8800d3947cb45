-- Plan labels, the listings' indexes, and the job queue.
ALTER TABLE plans ADD COLUMN label {{.Text}} NOT NULL DEFAULT '';

-- Listings run newest first by (created, id), filtered by facility, label or
-- neither.
CREATE INDEX plans_listing ON plans ({{.Created}}, id);
CREATE INDEX plans_facility_listing ON plans (facility_id, {{.Created}}, id);
CREATE INDEX plans_label_listing ON plans (label, {{.Created}}, id);

CREATE TABLE jobs (
    id          {{.Text}} PRIMARY KEY,
    kind        {{.Text}} NOT NULL,
    state       {{.Text}} NOT NULL CHECK (state IN ('queued', 'running', 'done', 'failed', 'cancelled')),
    request     {{.Bytes}} NOT NULL,
    summary     {{.Bytes}} NOT NULL,
    done        {{.Integer}} NOT NULL DEFAULT 0,
    total       {{.Integer}} NOT NULL DEFAULT 0,
    result      {{.Bytes}},
    problem     {{.Bytes}},
    owner       {{.Text}} NOT NULL DEFAULT '',
    attempt     {{.Integer}} NOT NULL DEFAULT 0,
    {{.Lease}} {{.Instant}},
    {{.Created}} {{.Instant}} NOT NULL,
    {{.Updated}} {{.Instant}} NOT NULL
);

-- Claims take the oldest open job; listings run newest first within a kind.
CREATE INDEX jobs_open ON jobs (state, {{.Created}}, id);
CREATE INDEX jobs_listing ON jobs (kind, {{.Created}}, id);

-- The values a job listing filters on: its facilities and its labels.
CREATE TABLE job_keys (
    job_id {{.Text}} NOT NULL REFERENCES jobs (id),
    field  {{.Text}} NOT NULL CHECK (field IN ('facility', 'label')),
    value  {{.Text}} NOT NULL,
    PRIMARY KEY (field, value, job_id)
);
