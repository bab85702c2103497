-- Quotes, payment links, payments and refunds are records: appended, never changed or deleted. A
-- replaced row (INSERT OR REPLACE) would silently drop what the provider confirmed, so it is refused too.
CREATE TRIGGER `quotes_no_update` BEFORE UPDATE ON `quotes`
BEGIN
  SELECT RAISE(ABORT, 'a quote is a record: it is never changed');
END;
--> statement-breakpoint
CREATE TRIGGER `quotes_no_delete` BEFORE DELETE ON `quotes`
BEGIN
  SELECT RAISE(ABORT, 'a quote is a record: it is never deleted');
END;
--> statement-breakpoint
CREATE TRIGGER `quotes_no_replace` BEFORE INSERT ON `quotes`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: quotes.rowid (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `quotes` WHERE rowid = NEW.rowid);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: quotes.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `quotes` WHERE `id` = NEW.`id`);
END;
--> statement-breakpoint
CREATE TRIGGER `payment_requests_no_update` BEFORE UPDATE ON `payment_requests`
BEGIN
  SELECT RAISE(ABORT, 'a payment link is a record: it is never changed');
END;
--> statement-breakpoint
CREATE TRIGGER `payment_requests_no_delete` BEFORE DELETE ON `payment_requests`
BEGIN
  SELECT RAISE(ABORT, 'a payment link is a record: it is never deleted');
END;
--> statement-breakpoint
CREATE TRIGGER `payment_requests_no_replace` BEFORE INSERT ON `payment_requests`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: payment_requests.rowid (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `payment_requests` WHERE rowid = NEW.rowid);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: payment_requests.session_id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `payment_requests` WHERE `session_id` = NEW.`session_id`);
END;
--> statement-breakpoint
CREATE TRIGGER `payments_no_update` BEFORE UPDATE ON `payments`
BEGIN
  SELECT RAISE(ABORT, 'a payment is a record: it is never changed');
END;
--> statement-breakpoint
CREATE TRIGGER `payments_no_delete` BEFORE DELETE ON `payments`
BEGIN
  SELECT RAISE(ABORT, 'a payment is a record: it is never deleted');
END;
--> statement-breakpoint
CREATE TRIGGER `payments_no_replace` BEFORE INSERT ON `payments`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: payments.rowid (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `payments` WHERE rowid = NEW.rowid);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: payments.session_id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `payments` WHERE `session_id` = NEW.`session_id`);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: payments.provider_event_id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `payments` WHERE `provider_event_id` = NEW.`provider_event_id`);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: payments.payment_intent_id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `payments` WHERE `payment_intent_id` = NEW.`payment_intent_id`);
END;
--> statement-breakpoint
CREATE TRIGGER `refunds_no_update` BEFORE UPDATE ON `refunds`
BEGIN
  SELECT RAISE(ABORT, 'a refund is a record: it is never changed');
END;
--> statement-breakpoint
CREATE TRIGGER `refunds_no_delete` BEFORE DELETE ON `refunds`
BEGIN
  SELECT RAISE(ABORT, 'a refund is a record: it is never deleted');
END;
--> statement-breakpoint
CREATE TRIGGER `refunds_no_replace` BEFORE INSERT ON `refunds`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: refunds.rowid (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `refunds` WHERE rowid = NEW.rowid);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: refunds.payment_id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `refunds` WHERE `payment_id` = NEW.`payment_id`);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: refunds.refund_id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `refunds` WHERE `refund_id` = NEW.`refund_id`);
END;
