CREATE TABLE `device_clocks` (
	`device_id` int NOT NULL,
	`skew_ms` double,
	`measured_ts` bigint,
	`time_source` enum('device','arrival') NOT NULL DEFAULT 'device',
	`changed_by` int,
	`changed_at` bigint,
	CONSTRAINT `device_clocks_device_id` PRIMARY KEY(`device_id`)
);
--> statement-breakpoint
CREATE TABLE `edge_nodes` (
	`id` int AUTO_INCREMENT NOT NULL,
	`code` varchar(64) NOT NULL,
	`group_id` varchar(64) NOT NULL,
	`node_id` varchar(64) NOT NULL,
	`label` varchar(120) NOT NULL,
	`secret_hash` varchar(100) NOT NULL,
	`enabled` boolean NOT NULL DEFAULT true,
	`online` boolean NOT NULL DEFAULT false,
	`bd_seq` int,
	`last_birth_ts` bigint,
	`last_death_ts` bigint,
	`last_seen_ts` bigint,
	`clock_skew_ms` double,
	`clock_skew_ts` bigint,
	`rebirth_requests` int NOT NULL DEFAULT 0,
	`seq_gaps` int NOT NULL DEFAULT 0,
	`rejected_count` int NOT NULL DEFAULT 0,
	`created_at` bigint NOT NULL,
	CONSTRAINT `edge_nodes_id` PRIMARY KEY(`id`),
	CONSTRAINT `edge_nodes_code_unique` UNIQUE(`code`),
	CONSTRAINT `edge_nodes_group_node_uq` UNIQUE(`group_id`,`node_id`)
);
--> statement-breakpoint
CREATE TABLE `gateway_devices` (
	`edge_node_id` int NOT NULL,
	`device_name` varchar(64) NOT NULL,
	`online` boolean NOT NULL DEFAULT false,
	`last_birth_ts` bigint,
	`last_death_ts` bigint,
	CONSTRAINT `gateway_devices_edge_node_id_device_name_pk` PRIMARY KEY(`edge_node_id`,`device_name`)
);
--> statement-breakpoint
CREATE TABLE `gateway_metrics` (
	`id` int AUTO_INCREMENT NOT NULL,
	`edge_node_id` int NOT NULL,
	`device_name` varchar(64) NOT NULL,
	`name` varchar(200) NOT NULL,
	`alias` bigint,
	`datatype` varchar(16) NOT NULL,
	`unit` varchar(24),
	`last_value` double,
	`last_text` varchar(120),
	`last_ts` bigint,
	`last_birth_ts` bigint NOT NULL,
	`target_device_id` int,
	`target_channel` varchar(16),
	`conversion` enum('none','v_to_kv','f_to_c','fraction_to_pct') NOT NULL DEFAULT 'none',
	`mapped_by` int,
	`mapped_at` bigint,
	CONSTRAINT `gateway_metrics_id` PRIMARY KEY(`id`),
	CONSTRAINT `gateway_metrics_uq` UNIQUE(`edge_node_id`,`device_name`,`name`)
);
--> statement-breakpoint
CREATE TABLE `gateway_rejections` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`ts` bigint NOT NULL,
	`edge_node_id` int,
	`topic` varchar(200) NOT NULL,
	`reason` varchar(40) NOT NULL,
	`detail` varchar(300),
	CONSTRAINT `gateway_rejections_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `late_findings` (
	`alert_id` int NOT NULL,
	`found_ts` bigint NOT NULL,
	`ended_ts` bigint,
	`quiet` boolean NOT NULL,
	CONSTRAINT `late_findings_alert_id` PRIMARY KEY(`alert_id`)
);
--> statement-breakpoint
CREATE INDEX `gateway_metrics_target_idx` ON `gateway_metrics` (`target_device_id`);--> statement-breakpoint
CREATE INDEX `gateway_rejections_node_idx` ON `gateway_rejections` (`edge_node_id`,`ts`);--> statement-breakpoint
CREATE INDEX `gateway_rejections_ts_idx` ON `gateway_rejections` (`ts`);--> statement-breakpoint
CREATE INDEX `late_findings_found_idx` ON `late_findings` (`found_ts`);