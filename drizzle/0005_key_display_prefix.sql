-- The console shows api_keys.prefix. It was the key's first 16 characters, which for a registered
-- (bootstrap) key of a format other than the issued one, `ebl_<kind>_<publicId>_<secret>`, are
-- secret characters. Such rows now show their public id (made up at registration, never part of
-- the key), as new rows do (displayPrefix in server/accounts/keys.ts). A row whose prefix is the
-- start of `ebl_<kind>_<publicId>` is public already and keeps it.
UPDATE `api_keys` SET `prefix` = `public_id`
WHERE `prefix` NOT IN (substr('ebl_live_' || `public_id`, 1, 16), substr('ebl_test_' || `public_id`, 1, 16));
