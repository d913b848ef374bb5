-- Resolving an API token in one statement (src/lib/server/auth/actor.ts). Every API request
-- resolves its token before anything else; done as a transaction (begin, set lapmark.system,
-- look up, touch, commit) that cost five round trips to the database on each request.
--
-- The function returns the token's row only while it is live: the hash matches, it is not
-- revoked, not expired, and its user is still a member of its shop (with that member role, so
-- the caller can take the lower of the two). It touches last_used_at at most once a minute.
-- It looks across shops for this lookup alone: lapmark.system is switched on for its own
-- statements and set back to what it was before it returns (an error aborts the transaction,
-- which undoes the setting too), so row-level security is unchanged for everything else.
-- (A SET clause on the function would be tidier, but PostgreSQL 15 lets only a superuser put a
-- custom setting there, and the app's role is not one.)
CREATE FUNCTION lapmark_token_actor(hash text)
RETURNS TABLE (
	"tokenId" uuid,
	"shopId" uuid,
	"userId" text,
	"tokenRole" role,
	"memberRole" role,
	"shopName" text,
	"shopSlug" text,
	"email" text,
	"name" text
)
LANGUAGE plpgsql VOLATILE AS $$
DECLARE
	outer_scope text := current_setting('lapmark.system', true);
	live record;
	is_live boolean;
BEGIN
	PERFORM set_config('lapmark.system', 'on', true);
	SELECT t.id, t.shop_id, t.user_id, t.role AS token_role, m.role AS member_role, s.name AS shop_name,
		s.slug AS shop_slug, u.email, u.name, t.last_used_at
	INTO live
	FROM api_tokens t
	JOIN "user" u ON u.id = t.user_id
	JOIN shops s ON s.id = t.shop_id
	JOIN memberships m ON m.shop_id = t.shop_id AND m.user_id = t.user_id
	WHERE t.token_hash = hash
		AND t.revoked_at IS NULL
		AND (t.expires_at IS NULL OR t.expires_at > now());
	is_live := FOUND;
	IF is_live AND (live.last_used_at IS NULL OR live.last_used_at < now() - interval '1 minute') THEN
		UPDATE api_tokens a SET last_used_at = now() WHERE a.id = live.id;
	END IF;
	PERFORM set_config('lapmark.system', coalesce(outer_scope, ''), true);
	IF is_live THEN
		"tokenId" := live.id;
		"shopId" := live.shop_id;
		"userId" := live.user_id;
		"tokenRole" := live.token_role;
		"memberRole" := live.member_role;
		"shopName" := live.shop_name;
		"shopSlug" := live.shop_slug;
		"email" := live.email;
		"name" := live.name;
		RETURN NEXT;
	END IF;
END $$;
