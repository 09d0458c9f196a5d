CREATE TABLE `phone_outbox` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`dedupe_key` varchar(160) NOT NULL,
	`channel` enum('sms','push') NOT NULL,
	`person_id` int NOT NULL,
	`alert_id` bigint,
	`to_address` varchar(40) NOT NULL,
	`title` varchar(160) NOT NULL,
	`body` varchar(640) NOT NULL,
	`url` varchar(500),
	`fallback_email` varchar(254),
	`state` enum('pending','sending','sent','failed') NOT NULL DEFAULT 'pending',
	`attempts` int NOT NULL DEFAULT 0,
	`next_attempt_ts` bigint NOT NULL,
	`last_error` varchar(500),
	`provider_id` varchar(120),
	`delivery_status` varchar(40),
	`fallback_mail_key` varchar(160),
	`created_ts` bigint NOT NULL,
	`sent_ts` bigint,
	CONSTRAINT `phone_outbox_id` PRIMARY KEY(`id`),
	CONSTRAINT `phone_outbox_dedupe_key_unique` UNIQUE(`dedupe_key`)
);
--> statement-breakpoint
CREATE TABLE `push_subscriptions` (
	`id` int AUTO_INCREMENT NOT NULL,
	`person_id` int NOT NULL,
	`endpoint_hash` char(64) NOT NULL,
	`endpoint` text NOT NULL,
	`p256dh` varchar(200) NOT NULL,
	`auth` varchar(100) NOT NULL,
	`user_agent` varchar(200),
	`created_ts` bigint NOT NULL,
	`last_ok_ts` bigint,
	CONSTRAINT `push_subscriptions_id` PRIMARY KEY(`id`),
	CONSTRAINT `push_subscriptions_endpoint_hash_unique` UNIQUE(`endpoint_hash`)
);
--> statement-breakpoint
ALTER TABLE `people` ADD `phone_e164` varchar(20);--> statement-breakpoint
ALTER TABLE `people` ADD `sms_severities` varchar(40) DEFAULT '' NOT NULL;--> statement-breakpoint
ALTER TABLE `people` ADD `push_severities` varchar(40) DEFAULT '' NOT NULL;--> statement-breakpoint
ALTER TABLE `outbox` ADD `chart` json;--> statement-breakpoint
ALTER TABLE `phone_outbox` ADD CONSTRAINT `phone_outbox_person_id_people_id_fk` FOREIGN KEY (`person_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `phone_outbox` ADD CONSTRAINT `phone_outbox_alert_id_alerts_id_fk` FOREIGN KEY (`alert_id`) REFERENCES `alerts`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `push_subscriptions` ADD CONSTRAINT `push_subscriptions_person_id_people_id_fk` FOREIGN KEY (`person_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `phone_outbox_state_idx` ON `phone_outbox` (`state`,`next_attempt_ts`);--> statement-breakpoint
CREATE INDEX `phone_outbox_alert_idx` ON `phone_outbox` (`alert_id`);--> statement-breakpoint
CREATE INDEX `push_subscriptions_person_idx` ON `push_subscriptions` (`person_id`);