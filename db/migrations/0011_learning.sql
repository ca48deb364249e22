CREATE TABLE `drill_steps` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`drill_id` text NOT NULL,
	`at_ms` integer NOT NULL,
	`user_id` text,
	`kind` text NOT NULL,
	`detail` text NOT NULL,
	`advice_at_time` text,
	FOREIGN KEY (`drill_id`) REFERENCES `drills`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `drill_steps_drill_idx` ON `drill_steps` (`drill_id`,`at_ms`);--> statement-breakpoint
CREATE TABLE `drills` (
	`id` text PRIMARY KEY NOT NULL,
	`site_id` text NOT NULL,
	`trainee_id` text NOT NULL,
	`started_by` text NOT NULL,
	`scenario` text NOT NULL,
	`speed` integer NOT NULL,
	`seed` integer NOT NULL,
	`hints` integer NOT NULL,
	`state` text DEFAULT 'running' NOT NULL,
	`outcome` text,
	`started_at_ms` integer NOT NULL,
	`ended_at_ms` integer,
	`score` text,
	`score_pct` real,
	`incident_id` text,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`trainee_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`started_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`incident_id`) REFERENCES `incidents`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `drills_trainee_idx` ON `drills` (`trainee_id`,`created_at`);--> statement-breakpoint
CREATE INDEX `drills_site_idx` ON `drills` (`site_id`);--> statement-breakpoint
CREATE TABLE `incident_alarms` (
	`incident_id` text NOT NULL,
	`alarm_id` text NOT NULL,
	`active_since_ms` integer NOT NULL,
	PRIMARY KEY(`alarm_id`, `active_since_ms`),
	FOREIGN KEY (`incident_id`) REFERENCES `incidents`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`alarm_id`) REFERENCES `alarms`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `incident_alarms_incident_idx` ON `incident_alarms` (`incident_id`);--> statement-breakpoint
CREATE TABLE `incidents` (
	`id` text PRIMARY KEY NOT NULL,
	`site_id` text NOT NULL,
	`title` text NOT NULL,
	`title_by_person` integer DEFAULT false NOT NULL,
	`state` text DEFAULT 'open' NOT NULL,
	`started_at_ms` integer NOT NULL,
	`ended_at_ms` integer,
	`root_hint` text,
	`cause` text DEFAULT '' NOT NULL,
	`lesson` text DEFAULT '' NOT NULL,
	`customer_summary` text DEFAULT '' NOT NULL,
	`shared_with_customer_at` integer,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	`updated_at` integer NOT NULL,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `incidents_site_idx` ON `incidents` (`site_id`,`started_at_ms`);--> statement-breakpoint
CREATE TABLE `saved_scenarios` (
	`id` text PRIMARY KEY NOT NULL,
	`name` text NOT NULL,
	`from_incident_id` text,
	`definition` text NOT NULL,
	`created_by` text NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`from_incident_id`) REFERENCES `incidents`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
ALTER TABLE `sites` ADD `training` integer DEFAULT false NOT NULL;