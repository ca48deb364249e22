CREATE TABLE `refrigerant_log` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`equipment_id` text NOT NULL,
	`site_id` text NOT NULL,
	`visit_id` text,
	`at` integer NOT NULL,
	`kind` text NOT NULL,
	`amount_kg` real,
	`cylinder` text,
	`reason` text NOT NULL,
	`result` text,
	`corrects_id` integer,
	`by_user` text NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`equipment_id`) REFERENCES `equipment`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`visit_id`) REFERENCES `visits`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`by_user`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `refrigerant_log_equipment_idx` ON `refrigerant_log` (`equipment_id`,`at`);--> statement-breakpoint
CREATE TABLE `service_requests` (
	`id` text PRIMARY KEY NOT NULL,
	`site_id` text NOT NULL,
	`requested_by` text NOT NULL,
	`description` text NOT NULL,
	`urgency` text NOT NULL,
	`callback_phone` text NOT NULL,
	`state` text DEFAULT 'received' NOT NULL,
	`assigned_to` text,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	`updated_at` integer NOT NULL,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`requested_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`assigned_to`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `service_requests_site_idx` ON `service_requests` (`site_id`,`state`);--> statement-breakpoint
CREATE TABLE `stored_files` (
	`id` text PRIMARY KEY NOT NULL,
	`site_id` text NOT NULL,
	`visit_id` text,
	`service_request_id` text,
	`uploaded_by` text NOT NULL,
	`media_type` text NOT NULL,
	`bytes` integer NOT NULL,
	`storage_key` text NOT NULL,
	`thumbnail_key` text,
	`original_name` text NOT NULL,
	`caption` text DEFAULT '' NOT NULL,
	`shared_with_customer` integer DEFAULT false NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`uploaded_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `stored_files_site_idx` ON `stored_files` (`site_id`);--> statement-breakpoint
CREATE INDEX `stored_files_visit_idx` ON `stored_files` (`visit_id`);--> statement-breakpoint
CREATE TABLE `temporary_changes` (
	`id` text PRIMARY KEY NOT NULL,
	`visit_id` text NOT NULL,
	`site_id` text NOT NULL,
	`equipment_id` text,
	`kind` text NOT NULL,
	`what` text NOT NULL,
	`point_quantity` text,
	`from_value` text NOT NULL,
	`to_value` text NOT NULL,
	`reason` text NOT NULL,
	`made_by` text NOT NULL,
	`made_at` integer NOT NULL,
	`put_back_due_at` integer NOT NULL,
	`put_back_at` integer,
	`put_back_by` text,
	`value_now` text,
	`last_reminded_at` integer,
	`reminders` integer DEFAULT 0 NOT NULL,
	`escalated_at` integer,
	FOREIGN KEY (`visit_id`) REFERENCES `visits`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`equipment_id`) REFERENCES `equipment`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`made_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`put_back_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `temporary_changes_site_idx` ON `temporary_changes` (`site_id`,`put_back_at`);--> statement-breakpoint
CREATE TABLE `visit_alarms` (
	`visit_id` text NOT NULL,
	`alarm_id` text NOT NULL,
	PRIMARY KEY(`visit_id`, `alarm_id`),
	FOREIGN KEY (`visit_id`) REFERENCES `visits`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`alarm_id`) REFERENCES `alarms`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `visit_alarms_alarm_idx` ON `visit_alarms` (`alarm_id`);--> statement-breakpoint
CREATE TABLE `visit_entries` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`visit_id` text NOT NULL,
	`at` integer NOT NULL,
	`author_id` text NOT NULL,
	`text` text NOT NULL,
	`file_id` text,
	FOREIGN KEY (`visit_id`) REFERENCES `visits`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`author_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`file_id`) REFERENCES `stored_files`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `visit_entries_visit_idx` ON `visit_entries` (`visit_id`,`at`);--> statement-breakpoint
CREATE TABLE `visit_reports` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`visit_id` text NOT NULL,
	`sent_at` integer NOT NULL,
	`sent_by` text NOT NULL,
	`recipients` text NOT NULL,
	FOREIGN KEY (`visit_id`) REFERENCES `visits`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`sent_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `visit_reports_visit_idx` ON `visit_reports` (`visit_id`);--> statement-breakpoint
CREATE TABLE `visits` (
	`id` text PRIMARY KEY NOT NULL,
	`site_id` text NOT NULL,
	`technician_id` text NOT NULL,
	`mode` text NOT NULL,
	`origin` text NOT NULL,
	`service_request_id` text,
	`opened_at` integer NOT NULL,
	`arrived_at` integer,
	`departed_at` integer,
	`closed_at` integer,
	`summary` text,
	`parts_used` text DEFAULT '[]' NOT NULL,
	`open_snapshot` text,
	`close_snapshot` text,
	`open_changes_note` text,
	`open_changes_owner` text,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`technician_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`service_request_id`) REFERENCES `service_requests`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`open_changes_owner`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `visits_site_idx` ON `visits` (`site_id`,`opened_at`);--> statement-breakpoint
-- Refrigerant records are often required by law: nothing may edit or delete them; corrections are new entries.
CREATE TRIGGER refrigerant_log_no_update BEFORE UPDATE ON refrigerant_log
BEGIN
  SELECT RAISE(ABORT, 'refrigerant_log is append-only');
END;
--> statement-breakpoint
CREATE TRIGGER refrigerant_log_no_delete BEFORE DELETE ON refrigerant_log
BEGIN
  SELECT RAISE(ABORT, 'refrigerant_log is append-only');
END;
