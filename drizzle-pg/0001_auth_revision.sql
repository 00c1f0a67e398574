-- Custom migration (drizzle-kit generate --custom): the authentication revision, as
-- drizzle/0003_auth_revision.sql does on SQLite. server/accounts/keys.ts keeps authenticated keys
-- in memory and trusts an entry only while auth_revision.revision is unchanged. These triggers bump
-- it in the same transaction as any change that can alter a key's authentication (new, deleted,
-- revoked, expired, re-scoped or re-limited keys; an account's quota, body retention or deletion),
-- whoever makes it: this process, another instance or a hand-run SQL statement. last_used_at is
-- left out on purpose: metering writes it. A new column that authentication reads must be added to
-- the UPDATE OF lists below (and to the SQLite triggers), in a new migration.
--
-- Row-level, as SQLite's triggers are: one bump per changed row. The function also sends
-- NOTIFY ebullio_auth_revision with the new revision; PostgreSQL delivers it only when the
-- transaction commits, so instances that LISTEN can forget their remembered keys without waiting
-- to read the revision (SQLite does this within one process with TEMP twins of these triggers).
CREATE TABLE "auth_revision" (
	"id" integer PRIMARY KEY NOT NULL CHECK ("id" = 1),
	"revision" bigint NOT NULL
);
--> statement-breakpoint
INSERT INTO "auth_revision" ("id", "revision") VALUES (1, 0);
--> statement-breakpoint
CREATE FUNCTION "auth_revision_bump"() RETURNS trigger LANGUAGE plpgsql AS $$
DECLARE
	next_revision bigint;
BEGIN
	UPDATE "auth_revision" SET "revision" = "revision" + 1 WHERE "id" = 1 RETURNING "revision" INTO next_revision;
	PERFORM pg_notify('ebullio_auth_revision', next_revision::text);
	RETURN NULL;
END;
$$;
--> statement-breakpoint
CREATE TRIGGER "api_keys_auth_revision_insert" AFTER INSERT ON "api_keys"
FOR EACH ROW EXECUTE FUNCTION "auth_revision_bump"();
--> statement-breakpoint
CREATE TRIGGER "api_keys_auth_revision_delete" AFTER DELETE ON "api_keys"
FOR EACH ROW EXECUTE FUNCTION "auth_revision_bump"();
--> statement-breakpoint
CREATE TRIGGER "api_keys_auth_revision_update"
AFTER UPDATE OF "id", "public_id", "account_id", "key_hash", "scopes", "rate_limit_per_minute", "expires_at", "revoked_at", "rotated_from_id" ON "api_keys"
FOR EACH ROW EXECUTE FUNCTION "auth_revision_bump"();
--> statement-breakpoint
CREATE TRIGGER "accounts_auth_revision_update"
AFTER UPDATE OF "id", "monthly_unit_quota", "retain_request_bodies" ON "accounts"
FOR EACH ROW EXECUTE FUNCTION "auth_revision_bump"();
--> statement-breakpoint
CREATE TRIGGER "accounts_auth_revision_delete" AFTER DELETE ON "accounts"
FOR EACH ROW EXECUTE FUNCTION "auth_revision_bump"();
