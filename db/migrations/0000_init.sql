CREATE TABLE `audit_log` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`ts` bigint NOT NULL,
	`person_id` int,
	`action` varchar(80) NOT NULL,
	`subject_type` varchar(40) NOT NULL,
	`subject_id` varchar(80),
	`summary` text NOT NULL,
	`detail` json,
	CONSTRAINT `audit_log_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `people` (
	`id` int AUTO_INCREMENT NOT NULL,
	`email` varchar(254) NOT NULL,
	`name` varchar(120) NOT NULL,
	`role` enum('viewer','shift_lead','engineer','admin') NOT NULL DEFAULT 'viewer',
	`password_hash` varchar(100) NOT NULL,
	`active` boolean NOT NULL DEFAULT true,
	`wants_daily_digest` boolean NOT NULL DEFAULT false,
	`on_maintenance_list` boolean NOT NULL DEFAULT false,
	`created_at` bigint NOT NULL,
	`updated_at` bigint NOT NULL,
	CONSTRAINT `people_id` PRIMARY KEY(`id`),
	CONSTRAINT `people_email_unique` UNIQUE(`email`)
);
--> statement-breakpoint
CREATE TABLE `settings` (
	`key` varchar(100) NOT NULL,
	`value` json NOT NULL,
	`updated_at` bigint NOT NULL,
	CONSTRAINT `settings_key` PRIMARY KEY(`key`)
);
--> statement-breakpoint
CREATE TABLE `sign_in_failures` (
	`key` varchar(300) NOT NULL,
	`window_start` bigint NOT NULL,
	`failures` int NOT NULL DEFAULT 0,
	`blocked_until` bigint NOT NULL DEFAULT 0,
	CONSTRAINT `sign_in_failures_key_pk` PRIMARY KEY(`key`)
);
--> statement-breakpoint
CREATE TABLE `areas` (
	`id` int AUTO_INCREMENT NOT NULL,
	`slug` varchar(60) NOT NULL,
	`name` varchar(120) NOT NULL,
	`rh_min_pct` double NOT NULL DEFAULT 40,
	`rh_max_pct` double NOT NULL DEFAULT 60,
	`temp_setpoint_c` double NOT NULL DEFAULT 21,
	`humidifier_kg_per_h` double NOT NULL DEFAULT 0,
	`airflow_m3_per_h` double NOT NULL DEFAULT 0,
	`display_order` int NOT NULL DEFAULT 0,
	CONSTRAINT `areas_id` PRIMARY KEY(`id`),
	CONSTRAINT `areas_slug_unique` UNIQUE(`slug`)
);
--> statement-breakpoint
CREATE TABLE `devices` (
	`id` int AUTO_INCREMENT NOT NULL,
	`code` varchar(64) NOT NULL,
	`kind` enum('field_meter','th_logger','speed_gateway') NOT NULL,
	`label` varchar(120) NOT NULL,
	`secret_hash` varchar(100) NOT NULL,
	`point_id` int,
	`area_id` int,
	`line_id` int,
	`calibrated_distance_mm` double,
	`mounting_distance_mm` double,
	`calibration_due` date,
	`enabled` boolean NOT NULL DEFAULT true,
	`online` boolean NOT NULL DEFAULT false,
	`last_seen_ts` bigint,
	`secret_rotated_at` bigint,
	`created_at` bigint NOT NULL,
	CONSTRAINT `devices_id` PRIMARY KEY(`id`),
	CONSTRAINT `devices_code_unique` UNIQUE(`code`)
);
--> statement-breakpoint
CREATE TABLE `lines` (
	`id` int AUTO_INCREMENT NOT NULL,
	`area_id` int NOT NULL,
	`slug` varchar(60) NOT NULL,
	`name` varchar(120) NOT NULL,
	`kind` enum('gravure_press','flexo_press','laminator','slitter_rewinder','bag_machine','labeller','extruder','other') NOT NULL,
	`nominal_speed_mpm` double NOT NULL,
	`material` varchar(120),
	`solvent_name` varchar(80),
	`solvent_mie_mj` double,
	`conductor_capacitance_pf` double,
	`display_order` int NOT NULL DEFAULT 0,
	CONSTRAINT `lines_id` PRIMARY KEY(`id`),
	CONSTRAINT `lines_slug_unique` UNIQUE(`slug`)
);
--> statement-breakpoint
CREATE TABLE `neutralizers` (
	`id` int AUTO_INCREMENT NOT NULL,
	`tag` varchar(60) NOT NULL,
	`kind` enum('ionizing_bar','ionized_air_blower','ionizing_nozzle','other') NOT NULL,
	`length_mm` double,
	`power_unit` varchar(120),
	`output_kv` double,
	`air_assisted` boolean NOT NULL DEFAULT false,
	`mounting_distance_mm` double,
	`point_id` int,
	`installed_on` date,
	`cleaning_interval_days` int NOT NULL DEFAULT 14,
	`check_interval_days` int NOT NULL DEFAULT 90,
	`last_cleaned_ts` bigint,
	`state` enum('in_service','needs_cleaning','faulty','removed') NOT NULL DEFAULT 'in_service',
	`notes` text,
	CONSTRAINT `neutralizers_id` PRIMARY KEY(`id`),
	CONSTRAINT `neutralizers_tag_unique` UNIQUE(`tag`)
);
--> statement-breakpoint
CREATE TABLE `points` (
	`id` int AUTO_INCREMENT NOT NULL,
	`line_id` int NOT NULL,
	`name` varchar(120) NOT NULL,
	`position` int NOT NULL,
	`description` text,
	CONSTRAINT `points_id` PRIMARY KEY(`id`),
	CONSTRAINT `points_line_pos_uq` UNIQUE(`line_id`,`position`)
);
--> statement-breakpoint
CREATE TABLE `ingest_rejections` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`ts` bigint NOT NULL,
	`device_code` varchar(64),
	`reason` varchar(40) NOT NULL,
	`detail` varchar(300),
	`payload` text,
	CONSTRAINT `ingest_rejections_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `ingest_status` (
	`worker_id` varchar(80) NOT NULL,
	`updated_ts` bigint NOT NULL,
	`stats` text NOT NULL,
	CONSTRAINT `ingest_status_worker_id` PRIMARY KEY(`worker_id`)
);
--> statement-breakpoint
CREATE TABLE `readings` (
	`device_id` int NOT NULL,
	`channel` varchar(16) NOT NULL,
	`ts` bigint NOT NULL,
	`value` double NOT NULL,
	CONSTRAINT `readings_device_id_channel_ts_pk` PRIMARY KEY(`device_id`,`channel`,`ts`)
);
--> statement-breakpoint
CREATE TABLE `rollup_1h` (
	`device_id` int NOT NULL,
	`channel` varchar(16) NOT NULL,
	`bucket_ts` bigint NOT NULL,
	`min` double NOT NULL,
	`max` double NOT NULL,
	`count` int NOT NULL,
	`sum` double NOT NULL,
	`sum_sq` double NOT NULL,
	CONSTRAINT `rollup_1h_device_id_channel_bucket_ts_pk` PRIMARY KEY(`device_id`,`channel`,`bucket_ts`)
);
--> statement-breakpoint
CREATE TABLE `rollup_1m` (
	`device_id` int NOT NULL,
	`channel` varchar(16) NOT NULL,
	`bucket_ts` bigint NOT NULL,
	`min` double NOT NULL,
	`max` double NOT NULL,
	`count` int NOT NULL,
	`sum` double NOT NULL,
	`sum_sq` double NOT NULL,
	CONSTRAINT `rollup_1m_device_id_channel_bucket_ts_pk` PRIMARY KEY(`device_id`,`channel`,`bucket_ts`)
);
--> statement-breakpoint
CREATE TABLE `alert_events` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`alert_id` bigint NOT NULL,
	`ts` bigint NOT NULL,
	`kind` enum('raised','updated','cleared','acknowledged','commented','shelved','unshelved','closed','notified','escalated') NOT NULL,
	`person_id` int,
	`comment` text,
	`value` varchar(32),
	CONSTRAINT `alert_events_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `alerts` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`rule_id` int NOT NULL,
	`rule_version` int NOT NULL,
	`kind` enum('charge_high','charge_rate','rh_low','rh_forecast','sensor_silent','sensor_flat','effect_loss') NOT NULL,
	`severity` enum('low','medium','high') NOT NULL,
	`subject_key` varchar(80) NOT NULL,
	`area_id` int,
	`line_id` int,
	`point_id` int,
	`device_id` int,
	`neutralizer_id` int,
	`state` enum('active_unacked','active_acked','cleared_unacked','closed') NOT NULL DEFAULT 'active_unacked',
	`message` varchar(300) NOT NULL,
	`start_ts` bigint NOT NULL,
	`end_ts` bigint,
	`closed_ts` bigint,
	`peak_value` double,
	`expected_crossing_ts` bigint,
	`chattering` boolean NOT NULL DEFAULT false,
	`shelved_until_ts` bigint,
	`shelved_reason` varchar(300),
	`acked_by` int,
	`acked_ts` bigint,
	`notified_level` int NOT NULL DEFAULT 0,
	CONSTRAINT `alerts_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `line_notes` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`line_id` int NOT NULL,
	`point_id` int,
	`ts` bigint NOT NULL,
	`text` varchar(500) NOT NULL,
	`person_id` int NOT NULL,
	`created_ts` bigint NOT NULL,
	CONSTRAINT `line_notes_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `oncall_shifts` (
	`id` int AUTO_INCREMENT NOT NULL,
	`person_id` int NOT NULL,
	`start_ts` bigint NOT NULL,
	`end_ts` bigint NOT NULL,
	`escalation_order` int NOT NULL DEFAULT 1,
	`note` varchar(200),
	CONSTRAINT `oncall_shifts_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `outbox` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`dedupe_key` varchar(160) NOT NULL,
	`to_address` varchar(254) NOT NULL,
	`subject` varchar(300) NOT NULL,
	`body_text` text NOT NULL,
	`body_html` text,
	`state` enum('pending','sending','sent','failed') NOT NULL DEFAULT 'pending',
	`attempts` int NOT NULL DEFAULT 0,
	`next_attempt_ts` bigint NOT NULL,
	`last_error` varchar(500),
	`created_ts` bigint NOT NULL,
	`sent_ts` bigint,
	`message_id` varchar(200),
	CONSTRAINT `outbox_id` PRIMARY KEY(`id`),
	CONSTRAINT `outbox_dedupe_key_unique` UNIQUE(`dedupe_key`)
);
--> statement-breakpoint
CREATE TABLE `rule_versions` (
	`id` int AUTO_INCREMENT NOT NULL,
	`rule_id` int NOT NULL,
	`version` int NOT NULL,
	`severity` enum('low','medium','high') NOT NULL,
	`on_delay_s` int NOT NULL,
	`off_delay_s` int NOT NULL,
	`only_while_running` boolean NOT NULL DEFAULT true,
	`params` json NOT NULL,
	`created_by` int,
	`created_at` bigint NOT NULL,
	`comment` varchar(300),
	CONSTRAINT `rule_versions_id` PRIMARY KEY(`id`),
	CONSTRAINT `rule_versions_uq` UNIQUE(`rule_id`,`version`)
);
--> statement-breakpoint
CREATE TABLE `rules` (
	`id` int AUTO_INCREMENT NOT NULL,
	`kind` enum('charge_high','charge_rate','rh_low','rh_forecast','sensor_silent','sensor_flat','effect_loss') NOT NULL,
	`name` varchar(160) NOT NULL,
	`point_id` int,
	`line_id` int,
	`area_id` int,
	`device_id` int,
	`neutralizer_id` int,
	`enabled` boolean NOT NULL DEFAULT true,
	`current_version` int NOT NULL DEFAULT 1,
	`created_at` bigint NOT NULL,
	CONSTRAINT `rules_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `checks` (
	`id` int AUTO_INCREMENT NOT NULL,
	`neutralizer_id` int NOT NULL,
	`ts` bigint NOT NULL,
	`method` enum('charged_plate','periodic') NOT NULL DEFAULT 'charged_plate',
	`plate_distance_mm` double,
	`decay_pos_s` double,
	`decay_neg_s` double,
	`offset_v` double,
	`instrument` varchar(120),
	`instrument_calibrated_on` date,
	`passed` boolean NOT NULL,
	`fail_reasons` varchar(300),
	`limits_used` text,
	`person_id` int,
	`notes` text,
	`import_key` varchar(80),
	CONSTRAINT `checks_id` PRIMARY KEY(`id`),
	CONSTRAINT `checks_import_uq` UNIQUE(`import_key`)
);
--> statement-breakpoint
CREATE TABLE `equipment_events` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`subject_type` enum('neutralizer','device') NOT NULL,
	`subject_id` int NOT NULL,
	`ts` bigint NOT NULL,
	`kind` enum('cleaned','check','fault','moved','note','upload','state_changed','created','edited','secret_rotated') NOT NULL,
	`person_id` int,
	`text` text,
	`check_id` int,
	`upload_id` int,
	CONSTRAINT `equipment_events_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `imported_files` (
	`id` int AUTO_INCREMENT NOT NULL,
	`kind` enum('check_log','humidity_log') NOT NULL,
	`sha256` varchar(64) NOT NULL,
	`original_name` varchar(255) NOT NULL,
	`rows_imported` int NOT NULL,
	`rows_rejected` int NOT NULL,
	`person_id` int,
	`created_ts` bigint NOT NULL,
	CONSTRAINT `imported_files_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `uploads` (
	`id` int AUTO_INCREMENT NOT NULL,
	`storage_key` varchar(200) NOT NULL,
	`original_name` varchar(255) NOT NULL,
	`mime_type` varchar(100) NOT NULL,
	`size_bytes` int NOT NULL,
	`sha256` varchar(64) NOT NULL,
	`thumbnail_key` varchar(200),
	`subject_type` enum('check','neutralizer','line_note','device') NOT NULL,
	`subject_id` bigint NOT NULL,
	`min_role` enum('viewer','shift_lead','engineer','admin') NOT NULL DEFAULT 'viewer',
	`person_id` int,
	`created_ts` bigint NOT NULL,
	CONSTRAINT `uploads_id` PRIMARY KEY(`id`),
	CONSTRAINT `uploads_storage_key_unique` UNIQUE(`storage_key`)
);
--> statement-breakpoint
CREATE INDEX `audit_ts_idx` ON `audit_log` (`ts`);--> statement-breakpoint
CREATE INDEX `audit_subject_idx` ON `audit_log` (`subject_type`,`subject_id`);--> statement-breakpoint
CREATE INDEX `devices_point_idx` ON `devices` (`point_id`);--> statement-breakpoint
CREATE INDEX `devices_area_idx` ON `devices` (`area_id`);--> statement-breakpoint
CREATE INDEX `lines_area_idx` ON `lines` (`area_id`);--> statement-breakpoint
CREATE INDEX `neutralizers_point_idx` ON `neutralizers` (`point_id`);--> statement-breakpoint
CREATE INDEX `rejections_ts_idx` ON `ingest_rejections` (`ts`);--> statement-breakpoint
CREATE INDEX `rejections_device_idx` ON `ingest_rejections` (`device_code`);--> statement-breakpoint
CREATE INDEX `alert_events_alert_idx` ON `alert_events` (`alert_id`,`ts`);--> statement-breakpoint
CREATE INDEX `alerts_state_idx` ON `alerts` (`state`,`severity`);--> statement-breakpoint
CREATE INDEX `alerts_line_idx` ON `alerts` (`line_id`,`start_ts`);--> statement-breakpoint
CREATE INDEX `alerts_area_idx` ON `alerts` (`area_id`,`start_ts`);--> statement-breakpoint
CREATE INDEX `alerts_start_idx` ON `alerts` (`start_ts`);--> statement-breakpoint
CREATE INDEX `alerts_rule_subject_idx` ON `alerts` (`rule_id`,`subject_key`,`start_ts`);--> statement-breakpoint
CREATE INDEX `line_notes_line_idx` ON `line_notes` (`line_id`,`ts`);--> statement-breakpoint
CREATE INDEX `oncall_time_idx` ON `oncall_shifts` (`start_ts`,`end_ts`);--> statement-breakpoint
CREATE INDEX `outbox_state_idx` ON `outbox` (`state`,`next_attempt_ts`);--> statement-breakpoint
CREATE INDEX `rules_scope_idx` ON `rules` (`kind`,`point_id`,`line_id`,`area_id`);--> statement-breakpoint
CREATE INDEX `checks_neutralizer_idx` ON `checks` (`neutralizer_id`,`ts`);--> statement-breakpoint
CREATE INDEX `equipment_events_subject_idx` ON `equipment_events` (`subject_type`,`subject_id`,`ts`);--> statement-breakpoint
CREATE INDEX `uploads_subject_idx` ON `uploads` (`subject_type`,`subject_id`);