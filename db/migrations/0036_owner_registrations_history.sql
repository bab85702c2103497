-- A registration is confirmed once (its time and owner set together, from nothing); nothing else changes.
CREATE TRIGGER `owner_registrations_confirm_once` BEFORE UPDATE ON `owner_registrations`
WHEN OLD.confirmed_at IS NOT NULL OR OLD.owner_id IS NOT NULL OR NEW.confirmed_at IS NULL OR NEW.owner_id IS NULL
  OR NEW.id IS NOT OLD.id OR NEW.pair_id IS NOT OLD.pair_id OR NEW.name IS NOT OLD.name OR NEW.email IS NOT OLD.email
  OR NEW.town IS NOT OLD.town OR NEW.country IS NOT OLD.country OR NEW.consent IS NOT OLD.consent
  OR NEW.token_hash IS NOT OLD.token_hash OR NEW.expires_at IS NOT OLD.expires_at OR NEW.created_at IS NOT OLD.created_at OR NEW.event_id IS NOT OLD.event_id
BEGIN
  SELECT RAISE(ABORT, 'an owner''s registration is confirmed once and otherwise never changed');
END;
--> statement-breakpoint
CREATE TRIGGER `owner_registrations_no_delete` BEFORE DELETE ON `owner_registrations`
BEGIN
  SELECT RAISE(ABORT, 'an owner''s registration is a record: it is never deleted');
END;
--> statement-breakpoint
-- A consent link is spent once (used_at set from nothing); nothing else changes, and none is deleted.
CREATE TRIGGER `owner_consent_links_spend_once` BEFORE UPDATE ON `owner_consent_links`
WHEN OLD.used_at IS NOT NULL OR NEW.used_at IS NULL
  OR NEW.id IS NOT OLD.id OR NEW.token_hash IS NOT OLD.token_hash OR NEW.registration_id IS NOT OLD.registration_id
  OR NEW.owner_id IS NOT OLD.owner_id OR NEW.created_at IS NOT OLD.created_at OR NEW.expires_at IS NOT OLD.expires_at
BEGIN
  SELECT RAISE(ABORT, 'a consent link is used once and otherwise never changed');
END;
--> statement-breakpoint
CREATE TRIGGER `owner_consent_links_no_delete` BEFORE DELETE ON `owner_consent_links`
BEGIN
  SELECT RAISE(ABORT, 'a consent link is a record: it is never deleted');
END;
