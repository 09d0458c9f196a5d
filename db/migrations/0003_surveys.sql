CREATE TABLE `meter_cross_checks` (
	`id` int AUTO_INCREMENT NOT NULL,
	`device_id` int NOT NULL,
	`survey_id` int NOT NULL,
	`reading_id` int NOT NULL,
	`ts` bigint NOT NULL,
	`handheld_kv` double NOT NULL,
	`fixed_kv` double NOT NULL,
	`diff_share` double NOT NULL,
	`allowed_share` double NOT NULL,
	`flagged` boolean NOT NULL,
	CONSTRAINT `meter_cross_checks_id` PRIMARY KEY(`id`),
	CONSTRAINT `meter_cross_checks_reading_uq` UNIQUE(`reading_id`)
);
--> statement-breakpoint
CREATE TABLE `survey_actions` (
	`id` int AUTO_INCREMENT NOT NULL,
	`survey_id` int NOT NULL,
	`finding_id` int,
	`kind` enum('clean_bar','move_bar','replace_bar','add_bar','check_earthing','raise_humidity','other') NOT NULL,
	`text` varchar(500) NOT NULL,
	`owner_id` int NOT NULL,
	`due_date` date NOT NULL,
	`state` enum('open','closed') NOT NULL DEFAULT 'open',
	`created_ts` bigint NOT NULL,
	`created_by` int,
	`closed_ts` bigint,
	`closed_by` int,
	`close_note` varchar(500),
	`resurvey_id` int,
	CONSTRAINT `survey_actions_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `survey_findings` (
	`id` int AUTO_INCREMENT NOT NULL,
	`survey_id` int NOT NULL,
	`kind` enum('over_limit','low_reduction','charge_build') NOT NULL,
	`spot_key` varchar(40) NOT NULL,
	`from_spot_key` varchar(40),
	`value_kv` double NOT NULL,
	`limit_kv` double,
	`reduction_pct` double,
	`text` varchar(400) NOT NULL,
	CONSTRAINT `survey_findings_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `survey_photos` (
	`id` int AUTO_INCREMENT NOT NULL,
	`survey_id` int NOT NULL,
	`spot_key` varchar(40) NOT NULL,
	`storage_key` varchar(200) NOT NULL,
	`thumbnail_key` varchar(200),
	`mime_type` varchar(60) NOT NULL,
	`size_bytes` int NOT NULL,
	`sha256` varchar(64) NOT NULL,
	`person_id` int,
	`created_ts` bigint NOT NULL,
	CONSTRAINT `survey_photos_id` PRIMARY KEY(`id`),
	CONSTRAINT `survey_photos_spot_uq` UNIQUE(`survey_id`,`spot_key`)
);
--> statement-breakpoint
CREATE TABLE `survey_plan_versions` (
	`id` int AUTO_INCREMENT NOT NULL,
	`plan_id` int NOT NULL,
	`version` int NOT NULL,
	`spots` json NOT NULL,
	`comment` varchar(300),
	`person_id` int,
	`created_ts` bigint NOT NULL,
	CONSTRAINT `survey_plan_versions_id` PRIMARY KEY(`id`),
	CONSTRAINT `survey_plan_versions_uq` UNIQUE(`plan_id`,`version`)
);
--> statement-breakpoint
CREATE TABLE `survey_plans` (
	`id` int AUTO_INCREMENT NOT NULL,
	`line_id` int NOT NULL,
	`name` varchar(120) NOT NULL,
	`current_version` int NOT NULL DEFAULT 1,
	`archived` boolean NOT NULL DEFAULT false,
	`created_ts` bigint NOT NULL,
	CONSTRAINT `survey_plans_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `survey_readings` (
	`id` int AUTO_INCREMENT NOT NULL,
	`survey_id` int NOT NULL,
	`spot_key` varchar(40) NOT NULL,
	`position` int NOT NULL,
	`point_id` int,
	`ts` bigint NOT NULL,
	`entered_value` double NOT NULL,
	`unit` enum('kV','V') NOT NULL,
	`read_kv` double NOT NULL,
	`distance_mm` double NOT NULL,
	`equivalent_kv` double NOT NULL,
	`running` boolean NOT NULL,
	`speed_mpm` double,
	`note` text,
	`fixed_device_id` int,
	`fixed_kv` double,
	CONSTRAINT `survey_readings_id` PRIMARY KEY(`id`),
	CONSTRAINT `survey_readings_spot_uq` UNIQUE(`survey_id`,`spot_key`)
);
--> statement-breakpoint
CREATE TABLE `surveys` (
	`id` int AUTO_INCREMENT NOT NULL,
	`client_id` varchar(36) NOT NULL,
	`plan_id` int NOT NULL,
	`plan_version` int NOT NULL,
	`line_id` int NOT NULL,
	`person_id` int,
	`started_ts` bigint NOT NULL,
	`finished_ts` bigint,
	`received_ts` bigint NOT NULL,
	`meter_label` varchar(120) NOT NULL,
	`meter_calibrated_on` date,
	`calibrated_distance_mm` double NOT NULL,
	`note` text,
	`resurvey_of_action_id` int,
	CONSTRAINT `surveys_id` PRIMARY KEY(`id`),
	CONSTRAINT `surveys_client_uq` UNIQUE(`client_id`)
);
--> statement-breakpoint
CREATE INDEX `meter_cross_checks_device_idx` ON `meter_cross_checks` (`device_id`,`ts`);--> statement-breakpoint
CREATE INDEX `survey_actions_state_idx` ON `survey_actions` (`state`,`due_date`);--> statement-breakpoint
CREATE INDEX `survey_actions_survey_idx` ON `survey_actions` (`survey_id`);--> statement-breakpoint
CREATE INDEX `survey_findings_survey_idx` ON `survey_findings` (`survey_id`);--> statement-breakpoint
CREATE INDEX `survey_plans_line_idx` ON `survey_plans` (`line_id`);--> statement-breakpoint
CREATE INDEX `surveys_plan_idx` ON `surveys` (`plan_id`,`started_ts`);--> statement-breakpoint
CREATE INDEX `surveys_line_idx` ON `surveys` (`line_id`,`started_ts`);