-- The event log is append-only: a mistake is answered by a new event that corrects it.
CREATE TRIGGER `events_no_update` BEFORE UPDATE ON `events`
BEGIN
  SELECT RAISE(ABORT, 'events are append-only: record a correction instead of updating');
END;
--> statement-breakpoint
CREATE TRIGGER `events_no_delete` BEFORE DELETE ON `events`
BEGIN
  SELECT RAISE(ABORT, 'events are append-only: they cannot be deleted');
END;
--> statement-breakpoint
CREATE TRIGGER `mail_attempts_no_update` BEFORE UPDATE ON `mail_attempts`
BEGIN
  SELECT RAISE(ABORT, 'mail attempts are append-only');
END;
--> statement-breakpoint
CREATE TRIGGER `mail_attempts_no_delete` BEFORE DELETE ON `mail_attempts`
BEGIN
  SELECT RAISE(ABORT, 'mail attempts are append-only');
END;
--> statement-breakpoint
CREATE TRIGGER `outbox_no_update` BEFORE UPDATE ON `outbox`
BEGIN
  SELECT RAISE(ABORT, 'queued mail is never changed');
END;
