CREATE TABLE `account_links` (
	`id` text PRIMARY KEY NOT NULL,
	`user_id` text NOT NULL,
	`purpose` text NOT NULL,
	`token_hash` text NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	`expires_at` integer NOT NULL,
	`used_at` integer,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE UNIQUE INDEX `account_links_token_hash_unique` ON `account_links` (`token_hash`);--> statement-breakpoint
CREATE INDEX `account_links_user_idx` ON `account_links` (`user_id`);--> statement-breakpoint
CREATE TABLE `audit_log` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`at` integer NOT NULL,
	`actor_id` text,
	`actor_name` text NOT NULL,
	`action` text NOT NULL,
	`entity_type` text NOT NULL,
	`entity_id` text NOT NULL,
	`site_id` text,
	`summary` text NOT NULL,
	`before` text,
	`after` text
);
--> statement-breakpoint
CREATE INDEX `audit_log_at_idx` ON `audit_log` (`at`);--> statement-breakpoint
CREATE INDEX `audit_log_entity_idx` ON `audit_log` (`entity_type`,`entity_id`);--> statement-breakpoint
CREATE INDEX `audit_log_site_idx` ON `audit_log` (`site_id`);--> statement-breakpoint
CREATE TABLE `equipment_limits` (
	`equipment_id` text NOT NULL,
	`key` text NOT NULL,
	`value` real NOT NULL,
	`set_by` text,
	`set_at` integer NOT NULL,
	PRIMARY KEY(`equipment_id`, `key`),
	FOREIGN KEY (`equipment_id`) REFERENCES `equipment`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`set_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
ALTER TABLE `api_tokens` ADD `scope` text DEFAULT 'act' NOT NULL;--> statement-breakpoint
ALTER TABLE `equipment` ADD `record` text DEFAULT '{}' NOT NULL;--> statement-breakpoint
ALTER TABLE `equipment` ADD `retired_at` integer;--> statement-breakpoint
ALTER TABLE `equipment` ADD `retired_by` text;--> statement-breakpoint
ALTER TABLE `organizations` ADD `retired_at` integer;--> statement-breakpoint
ALTER TABLE `organizations` ADD `retired_by` text;--> statement-breakpoint
ALTER TABLE `sites` ADD `contacts` text DEFAULT '[]' NOT NULL;--> statement-breakpoint
ALTER TABLE `sites` ADD `access_notes` text DEFAULT '' NOT NULL;--> statement-breakpoint
ALTER TABLE `sites` ADD `retired_at` integer;--> statement-breakpoint
ALTER TABLE `sites` ADD `retired_by` text;--> statement-breakpoint
ALTER TABLE `users` ADD `phone` text;--> statement-breakpoint
ALTER TABLE `users` ADD `password_set_at` integer;--> statement-breakpoint
-- The audit trail is append-only: nothing may edit or delete it.
CREATE TRIGGER audit_log_no_update BEFORE UPDATE ON audit_log
BEGIN
  SELECT RAISE(ABORT, 'audit_log is append-only');
END;
--> statement-breakpoint
CREATE TRIGGER audit_log_no_delete BEFORE DELETE ON audit_log
BEGIN
  SELECT RAISE(ABORT, 'audit_log is append-only');
END;
--> statement-breakpoint
-- Accounts that already exist have chosen their password.
UPDATE `users` SET `password_set_at` = `created_at`;
