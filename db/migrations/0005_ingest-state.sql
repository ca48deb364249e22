CREATE TABLE `ingest_state` (
	`key` text PRIMARY KEY NOT NULL,
	`value` integer NOT NULL
);
