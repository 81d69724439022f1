-- The role Earmark connects as: it owns its database and schema (so it can migrate them) and
-- nothing else: no superuser, no CREATEDB, no CREATEROLE. Run once, as a superuser, with psql:
--   psql -v role=earmark -v password='…' -v database=earmark -f infra/sql/create-app-role.sql
-- (docs/operations.md, "Database role"; tests/support/production-stack.ts runs this very file).
CREATE ROLE :"role" LOGIN PASSWORD :'password' NOSUPERUSER NOCREATEDB NOCREATEROLE NOREPLICATION NOBYPASSRLS;
CREATE DATABASE :"database" OWNER :"role";
\connect :"database"
-- The application's tables live in public, owned by the role; nobody else may create objects
-- there. The job queue (pg-boss) creates its own schema, pgboss, on first start: the database
-- owner may.
ALTER SCHEMA public OWNER TO :"role";
REVOKE ALL ON SCHEMA public FROM PUBLIC;
