-- Sessions are now stored by the SHA-256 of the cookie's token, not the token itself.
-- Sessions made before this change hold plain tokens and can never match again: end them.
DELETE FROM `sessions`;
