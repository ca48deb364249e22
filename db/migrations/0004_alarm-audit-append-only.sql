-- The alarm audit trail and its notes are append-only: nothing may edit or delete them.
CREATE TRIGGER alarm_events_no_update BEFORE UPDATE ON alarm_events
BEGIN
  SELECT RAISE(ABORT, 'alarm_events is append-only');
END;
--> statement-breakpoint
CREATE TRIGGER alarm_events_no_delete BEFORE DELETE ON alarm_events
BEGIN
  SELECT RAISE(ABORT, 'alarm_events is append-only');
END;
--> statement-breakpoint
CREATE TRIGGER alarm_notes_no_update BEFORE UPDATE ON alarm_notes
BEGIN
  SELECT RAISE(ABORT, 'alarm_notes is append-only');
END;
--> statement-breakpoint
CREATE TRIGGER alarm_notes_no_delete BEFORE DELETE ON alarm_notes
BEGIN
  SELECT RAISE(ABORT, 'alarm_notes is append-only');
END;
