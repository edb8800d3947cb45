-- plans_facility (facility_id, facility_version) served no query: listings by
-- facility read plans_facility_listing, whose first column is the same. Every
-- stored plan wrote it (a page of the log per group commit in SQLite, an index
-- entry in PostgreSQL) for nothing.
DROP INDEX plans_facility;
