ALTER TABLE `alerts` ADD `notify_group` varchar(80);--> statement-breakpoint
CREATE INDEX `alerts_notify_group_idx` ON `alerts` (`notify_group`);