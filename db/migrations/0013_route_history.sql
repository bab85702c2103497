CREATE TRIGGER `process_specs_no_update` BEFORE UPDATE ON `process_specs`
BEGIN
  SELECT RAISE(ABORT, 'a process spec version is fixed: edit it by making a new version');
END;
--> statement-breakpoint
CREATE TRIGGER `process_specs_no_delete` BEFORE DELETE ON `process_specs`
BEGIN
  SELECT RAISE(ABORT, 'process spec versions are never deleted: pairs follow them');
END;
--> statement-breakpoint
CREATE TRIGGER `route_starts_no_update` BEFORE UPDATE ON `route_starts`
BEGIN
  SELECT RAISE(ABORT, 'a pair keeps the spec version it started under');
END;
--> statement-breakpoint
CREATE TRIGGER `route_starts_no_delete` BEFORE DELETE ON `route_starts`
BEGIN
  SELECT RAISE(ABORT, 'a pair keeps the spec version it started under');
END;
--> statement-breakpoint
CREATE TRIGGER `route_records_no_update` BEFORE UPDATE ON `route_records`
BEGIN
  SELECT RAISE(ABORT, 'route records are appended, never changed');
END;
--> statement-breakpoint
CREATE TRIGGER `route_records_no_delete` BEFORE DELETE ON `route_records`
BEGIN
  SELECT RAISE(ABORT, 'route records are appended, never deleted');
END;
--> statement-breakpoint
CREATE TRIGGER `nonconformances_no_delete` BEFORE DELETE ON `nonconformances`
BEGIN
  SELECT RAISE(ABORT, 'nonconformances are never deleted');
END;
--> statement-breakpoint
CREATE TRIGGER `nonconformances_disposition_once` BEFORE UPDATE ON `nonconformances`
WHEN OLD.disposition IS NOT NULL
  OR NEW.id IS NOT OLD.id OR NEW.code IS NOT OLD.code OR NEW.pair_id IS NOT OLD.pair_id OR NEW.record_id IS NOT OLD.record_id
  OR NEW.cabinets IS NOT OLD.cabinets OR NEW.seq IS NOT OLD.seq OR NEW.finding IS NOT OLD.finding
  OR NEW.opened_at IS NOT OLD.opened_at OR NEW.opened_event_id IS NOT OLD.opened_event_id
BEGIN
  SELECT RAISE(ABORT, 'a nonconformance is dispositioned once; its finding never changes');
END;
