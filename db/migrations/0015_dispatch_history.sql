CREATE TRIGGER `final_tests_no_update` BEFORE UPDATE ON `final_tests`
BEGIN
  SELECT RAISE(ABORT, 'final tests are appended, never changed: test again instead');
END;
--> statement-breakpoint
CREATE TRIGGER `final_tests_no_delete` BEFORE DELETE ON `final_tests`
BEGIN
  SELECT RAISE(ABORT, 'final tests are appended, never deleted');
END;
--> statement-breakpoint
CREATE TRIGGER `certificates_no_update` BEFORE UPDATE ON `certificates`
BEGIN
  SELECT RAISE(ABORT, 'a certificate is issued once and never changed; a reprint is a copy');
END;
--> statement-breakpoint
CREATE TRIGGER `certificates_no_delete` BEFORE DELETE ON `certificates`
BEGIN
  SELECT RAISE(ABORT, 'certificates are never deleted');
END;
--> statement-breakpoint
CREATE TRIGGER `carton_locations_no_update` BEFORE UPDATE ON `carton_locations`
BEGIN
  SELECT RAISE(ABORT, 'carton locations are appended: record the new location');
END;
--> statement-breakpoint
CREATE TRIGGER `carton_locations_no_delete` BEFORE DELETE ON `carton_locations`
BEGIN
  SELECT RAISE(ABORT, 'carton locations are appended, never deleted');
END;
--> statement-breakpoint
CREATE TRIGGER `shipment_details_no_update` BEFORE UPDATE ON `shipment_details`
BEGIN
  SELECT RAISE(ABORT, 'a shipment record is appended, never changed');
END;
--> statement-breakpoint
CREATE TRIGGER `shipment_details_no_delete` BEFORE DELETE ON `shipment_details`
BEGIN
  SELECT RAISE(ABORT, 'a shipment record is never deleted');
END;
