-- Hand-edited: WITHOUT ROWID like readings_1m (drizzle-kit cannot declare it), and the hours
-- of the minutes already stored, so long trends read the same history as before.
CREATE TABLE `readings_1h` (
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
INSERT INTO `readings_1h` (`point_id`, `bucket`, `min`, `max`, `sum`, `count`, `last`, `last_ts`)
SELECT `m`.`point_id`, `m`.`hour`, min(`m`.`min`), max(`m`.`max`), sum(`m`.`sum`), sum(`m`.`count`),
	(SELECT `l`.`last` FROM `readings_1m` `l` WHERE `l`.`point_id` = `m`.`point_id` AND `l`.`bucket` >= `m`.`hour` AND `l`.`bucket` < `m`.`hour` + 3600000 ORDER BY `l`.`last_ts` DESC, `l`.`bucket` DESC LIMIT 1),
	max(`m`.`last_ts`)
FROM (SELECT *, (`bucket` / 3600000) * 3600000 AS `hour` FROM `readings_1m`) `m`
GROUP BY `m`.`point_id`, `m`.`hour`;
