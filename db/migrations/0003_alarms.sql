CREATE TABLE `ack_links` (
	`id` text PRIMARY KEY NOT NULL,
	`alarm_id` text NOT NULL,
	`user_id` text NOT NULL,
	`expires_at` integer NOT NULL,
	`used_at` integer,
	FOREIGN KEY (`alarm_id`) REFERENCES `alarms`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE TABLE `alarm_events` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`alarm_id` text NOT NULL,
	`site_id` text NOT NULL,
	`from_state` text NOT NULL,
	`to_state` text NOT NULL,
	`cause` text NOT NULL,
	`priority` integer NOT NULL,
	`event_at_ms` integer NOT NULL,
	`wall_at_ms` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	`actor_user_id` text,
	`note` text,
	FOREIGN KEY (`alarm_id`) REFERENCES `alarms`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`actor_user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `alarm_events_alarm_idx` ON `alarm_events` (`alarm_id`,`id`);--> statement-breakpoint
CREATE INDEX `alarm_events_site_time_idx` ON `alarm_events` (`site_id`,`event_at_ms`);--> statement-breakpoint
CREATE TABLE `alarm_notes` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`alarm_id` text NOT NULL,
	`user_id` text NOT NULL,
	`text` text NOT NULL,
	`visibility` text NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`alarm_id`) REFERENCES `alarms`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `alarm_notes_alarm_idx` ON `alarm_notes` (`alarm_id`);--> statement-breakpoint
CREATE TABLE `alarm_notifications` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`alarm_id` text NOT NULL,
	`activation` integer NOT NULL,
	`step` integer NOT NULL,
	`user_id` text NOT NULL,
	`email` text NOT NULL,
	`sent_at` integer NOT NULL,
	FOREIGN KEY (`alarm_id`) REFERENCES `alarms`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `alarm_notifications_unique` ON `alarm_notifications` (`alarm_id`,`activation`,`step`,`user_id`);--> statement-breakpoint
CREATE TABLE `alarms` (
	`id` text PRIMARY KEY NOT NULL,
	`site_id` text NOT NULL,
	`key` text NOT NULL,
	`rule_id` text NOT NULL,
	`equipment` text NOT NULL,
	`priority` integer NOT NULL,
	`state` text NOT NULL,
	`condition_active` integer NOT NULL,
	`machine_json` text NOT NULL,
	`detail_json` text NOT NULL,
	`active_since_ms` integer,
	`last_transition_ms` integer,
	`activations` integer DEFAULT 0 NOT NULL,
	`updated_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE UNIQUE INDEX `alarms_site_key_unique` ON `alarms` (`site_id`,`key`);--> statement-breakpoint
CREATE INDEX `alarms_state_idx` ON `alarms` (`state`);--> statement-breakpoint
CREATE TABLE `mail_messages` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`from_address` text NOT NULL,
	`to_address` text NOT NULL,
	`subject` text NOT NULL,
	`text` text NOT NULL,
	`received_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL
);
--> statement-breakpoint
CREATE INDEX `mail_messages_to_idx` ON `mail_messages` (`to_address`);--> statement-breakpoint
CREATE TABLE `on_call_shifts` (
	`id` text PRIMARY KEY NOT NULL,
	`starts_at` integer NOT NULL,
	`ends_at` integer NOT NULL,
	`primary_user_id` text NOT NULL,
	`backup_user_id` text,
	FOREIGN KEY (`primary_user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`backup_user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `on_call_shifts_time_idx` ON `on_call_shifts` (`starts_at`,`ends_at`);--> statement-breakpoint
CREATE TABLE `site_rule_settings` (
	`site_id` text PRIMARY KEY NOT NULL,
	`settings_json` text NOT NULL,
	`updated_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	`updated_by` text,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`updated_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
