-- Measurements are records: appended, never changed or deleted.
CREATE TRIGGER `responses_no_update` BEFORE UPDATE ON `responses`
BEGIN
  SELECT RAISE(ABORT, 'responses are appended, never changed: measure again instead');
END;
--> statement-breakpoint
CREATE TRIGGER `responses_no_delete` BEFORE DELETE ON `responses`
BEGIN
  SELECT RAISE(ABORT, 'responses are appended, never deleted');
END;
--> statement-breakpoint
CREATE TRIGGER `ts_params_no_update` BEFORE UPDATE ON `ts_params`
BEGIN
  SELECT RAISE(ABORT, 'Thiele-Small parameters are appended, never changed: measure again instead');
END;
--> statement-breakpoint
CREATE TRIGGER `ts_params_no_delete` BEFORE DELETE ON `ts_params`
BEGIN
  SELECT RAISE(ABORT, 'Thiele-Small parameters are appended, never deleted');
END;
--> statement-breakpoint
CREATE TRIGGER `matched_sets_no_update` BEFORE UPDATE ON `matched_sets`
BEGIN
  SELECT RAISE(ABORT, 'matched sets are appended, never changed');
END;
--> statement-breakpoint
CREATE TRIGGER `matched_sets_no_delete` BEFORE DELETE ON `matched_sets`
BEGIN
  SELECT RAISE(ABORT, 'matched sets are appended, never deleted');
END;
--> statement-breakpoint
CREATE TRIGGER `set_members_no_delete` BEFORE DELETE ON `set_members`
BEGIN
  SELECT RAISE(ABORT, 'set members are history: end a reservation instead of deleting it');
END;
--> statement-breakpoint
CREATE TRIGGER `set_members_end_once` BEFORE UPDATE ON `set_members`
WHEN OLD.ended_at IS NOT NULL
  OR NEW.id IS NOT OLD.id OR NEW.set_id IS NOT OLD.set_id OR NEW.item_id IS NOT OLD.item_id OR NEW.side IS NOT OLD.side
BEGIN
  SELECT RAISE(ABORT, 'set members are history: only an open reservation may be ended, once');
END;
--> statement-breakpoint
CREATE TRIGGER `unit_batches_no_update` BEFORE UPDATE ON `unit_batches`
BEGIN
  SELECT RAISE(ABORT, 'a batch intake is a record: it is appended, never changed');
END;
--> statement-breakpoint
CREATE TRIGGER `batch_units_no_update` BEFORE UPDATE ON `batch_units`
BEGIN
  SELECT RAISE(ABORT, 'a unit keeps its batch and maker serial');
END;
--> statement-breakpoint
CREATE TRIGGER `crossover_parts_no_update` BEFORE UPDATE ON `crossover_parts`
BEGIN
  SELECT RAISE(ABORT, 'a crossover build is a record: build a new board instead');
END;
--> statement-breakpoint
CREATE TRIGGER `crossover_parts_no_delete` BEFORE DELETE ON `crossover_parts`
BEGIN
  SELECT RAISE(ABORT, 'a crossover build is a record: it is never deleted');
END;
--> statement-breakpoint
CREATE TRIGGER `machine_tokens_revoke_once` BEFORE UPDATE ON `machine_tokens`
WHEN OLD.revoked_at IS NOT NULL
  OR NEW.id IS NOT OLD.id OR NEW.name IS NOT OLD.name OR NEW.token_hash IS NOT OLD.token_hash
  OR NEW.prefix IS NOT OLD.prefix OR NEW.scope IS NOT OLD.scope OR NEW.created_at IS NOT OLD.created_at
BEGIN
  SELECT RAISE(ABORT, 'a machine token can only be revoked, once');
END;
--> statement-breakpoint
CREATE TRIGGER `machine_tokens_no_delete` BEFORE DELETE ON `machine_tokens`
BEGIN
  SELECT RAISE(ABORT, 'machine tokens are revoked, never deleted');
END;
