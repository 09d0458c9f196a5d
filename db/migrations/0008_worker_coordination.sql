CREATE TABLE `alert_engine_rows` (
	`rule_id` int NOT NULL,
	`subject_key` varchar(120) NOT NULL,
	`rule_version` int NOT NULL,
	`state` text NOT NULL,
	`updated_ts` bigint NOT NULL,
	`token` bigint NOT NULL,
	CONSTRAINT `alert_engine_rows_rule_id_subject_key_pk` PRIMARY KEY(`rule_id`,`subject_key`)
);
--> statement-breakpoint
CREATE TABLE `alert_owner_progress` (
	`name` varchar(40) NOT NULL,
	`journal_id` bigint NOT NULL,
	`seen_above` text NOT NULL,
	`reading_ts` bigint NOT NULL,
	`updated_ts` bigint NOT NULL,
	`token` bigint NOT NULL,
	CONSTRAINT `alert_owner_progress_name` PRIMARY KEY(`name`)
);
--> statement-breakpoint
CREATE TABLE `reading_journal` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`created_ts` bigint NOT NULL,
	`row_count` int NOT NULL,
	`body` mediumtext NOT NULL,
	CONSTRAINT `reading_journal_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `service_leases` (
	`name` varchar(40) NOT NULL,
	`holder` varchar(120),
	`token` bigint NOT NULL DEFAULT 0,
	`expires_ts` bigint NOT NULL DEFAULT 0,
	`acquired_ts` bigint,
	CONSTRAINT `service_leases_name` PRIMARY KEY(`name`)
);
--> statement-breakpoint
ALTER TABLE `devices` MODIFY COLUMN `secret_hash` varchar(255) NOT NULL;--> statement-breakpoint
ALTER TABLE `edge_nodes` MODIFY COLUMN `secret_hash` varchar(255) NOT NULL;--> statement-breakpoint
CREATE INDEX `reading_journal_created_idx` ON `reading_journal` (`created_ts`);