-- Custom SQL migration: drizzle-kit cannot declare WITHOUT ROWID, so the two time-series
-- tables from 0001 are rebuilt with it. Their rows then live in the (point_id, ts) primary
-- key b-tree itself: one b-tree per table instead of a rowid table plus an index.
CREATE TABLE `readings_new` (
	`point_id` integer NOT NULL,
	`ts` integer NOT NULL,
	`value` real,
	`text` text,
	`quality` integer DEFAULT 0 NOT NULL,
	PRIMARY KEY(`point_id`, `ts`),
	FOREIGN KEY (`point_id`) REFERENCES `points`(`id`) ON UPDATE no action ON DELETE cascade
) WITHOUT ROWID;
--> statement-breakpoint
INSERT INTO `readings_new` SELECT `point_id`, `ts`, `value`, `text`, `quality` FROM `readings`;
--> statement-breakpoint
DROP TABLE `readings`;
--> statement-breakpoint
ALTER TABLE `readings_new` RENAME TO `readings`;
--> statement-breakpoint
CREATE TABLE `readings_1m_new` (
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
) WITHOUT ROWID;
--> statement-breakpoint
INSERT INTO `readings_1m_new` SELECT `point_id`, `bucket`, `min`, `max`, `sum`, `count`, `last`, `last_ts` FROM `readings_1m`;
--> statement-breakpoint
DROP TABLE `readings_1m`;
--> statement-breakpoint
ALTER TABLE `readings_1m_new` RENAME TO `readings_1m`;
