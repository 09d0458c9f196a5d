CREATE TABLE `maintenance_windows` (
	`id` int AUTO_INCREMENT NOT NULL,
	`target_kind` enum('neutralizer','point','line','area') NOT NULL,
	`target_id` int NOT NULL,
	`owner_id` int NOT NULL,
	`reason` varchar(300) NOT NULL,
	`start_ts` bigint NOT NULL,
	`end_ts` bigint NOT NULL,
	`extend_reason` varchar(300),
	`created_by` int NOT NULL,
	`created_ts` bigint NOT NULL,
	`ended_early_ts` bigint,
	`summary` text,
	`summarized_ts` bigint,
	CONSTRAINT `maintenance_windows_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `maintenance_windows` ADD CONSTRAINT `maintenance_windows_owner_id_people_id_fk` FOREIGN KEY (`owner_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `maintenance_windows` ADD CONSTRAINT `maintenance_windows_created_by_people_id_fk` FOREIGN KEY (`created_by`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `maintenance_windows_end_idx` ON `maintenance_windows` (`end_ts`);--> statement-breakpoint
CREATE INDEX `maintenance_windows_target_idx` ON `maintenance_windows` (`target_kind`,`target_id`);