CREATE TABLE `gateway_point_maps` (
	`gateway_id` text NOT NULL,
	`gateway_point` text NOT NULL,
	`point_id` integer NOT NULL,
	`unit` text NOT NULL,
	PRIMARY KEY(`gateway_id`, `gateway_point`),
	FOREIGN KEY (`gateway_id`) REFERENCES `gateways`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`point_id`) REFERENCES `points`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `gateway_point_maps_point_idx` ON `gateway_point_maps` (`point_id`);--> statement-breakpoint
CREATE TABLE `gateway_rejections` (
	`gateway_id` text NOT NULL,
	`reason` text NOT NULL,
	`count` integer DEFAULT 0 NOT NULL,
	`last_at` integer NOT NULL,
	PRIMARY KEY(`gateway_id`, `reason`),
	FOREIGN KEY (`gateway_id`) REFERENCES `gateways`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE TABLE `gateway_unmapped_points` (
	`gateway_id` text NOT NULL,
	`point_name` text NOT NULL,
	`count` integer DEFAULT 0 NOT NULL,
	`last_seen_at` integer NOT NULL,
	PRIMARY KEY(`gateway_id`, `point_name`),
	FOREIGN KEY (`gateway_id`) REFERENCES `gateways`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE TABLE `gateways` (
	`id` text PRIMARY KEY NOT NULL,
	`site_id` text NOT NULL,
	`name` text NOT NULL,
	`protocol` text NOT NULL,
	`group_id` text,
	`edge_node_id` text,
	`username` text NOT NULL,
	`password_hash` text NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	`password_rotated_at` integer,
	`revoked_at` integer,
	`state` text DEFAULT 'unknown' NOT NULL,
	`state_changed_at` integer,
	`last_message_at` integer,
	`messages` integer DEFAULT 0 NOT NULL,
	`readings_accepted` integer DEFAULT 0 NOT NULL,
	`readings_duplicate` integer DEFAULT 0 NOT NULL,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE UNIQUE INDEX `gateways_username_unique` ON `gateways` (`username`);--> statement-breakpoint
CREATE UNIQUE INDEX `gateways_sparkplug_unique` ON `gateways` (`group_id`,`edge_node_id`);--> statement-breakpoint
CREATE INDEX `gateways_site_idx` ON `gateways` (`site_id`);--> statement-breakpoint
CREATE TABLE `latest_values` (
	`point_id` integer PRIMARY KEY NOT NULL,
	`ts` integer NOT NULL,
	`value` real,
	`text` text,
	`quality` integer DEFAULT 0 NOT NULL,
	`gateway_id` text,
	`received_at` integer NOT NULL,
	FOREIGN KEY (`point_id`) REFERENCES `points`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE TABLE `readings` (
	`point_id` integer NOT NULL,
	`ts` integer NOT NULL,
	`value` real,
	`text` text,
	`quality` integer DEFAULT 0 NOT NULL,
	PRIMARY KEY(`point_id`, `ts`),
	FOREIGN KEY (`point_id`) REFERENCES `points`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE TABLE `readings_1m` (
	`point_id` integer NOT NULL,
	`bucket` integer NOT NULL,
	`min` real NOT NULL,
	`max` real NOT NULL,
	`sum` real NOT NULL,
	`count` integer NOT NULL,
	`last` real NOT NULL,
	`last_ts` integer NOT NULL,
	PRIMARY KEY(`point_id`, `bucket`),
	FOREIGN KEY (`point_id`) REFERENCES `points`(`id`) ON UPDATE no action ON DELETE cascade
);
