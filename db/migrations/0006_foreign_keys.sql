-- Foreign keys between the tables (db/schema/*.ts, relations in db/schema/relations.ts). They are
-- ON DELETE RESTRICT ("no action"): the app never deletes plant rows, people, rules or alerts
-- (people are deactivated, neutralizers marked removed); the only deletes are of rows nothing
-- refers to (an on-call shift, a cross-check being replaced, throttle and rejection pruning).
-- Before the keys are added, rows that would break them are repaired, so this runs on any
-- existing database: rows left without their hall, line or person are kept under a placeholder
-- ("Unassigned" hall/line, an inactive "Former person" who cannot sign in); optional links to a
-- missing row are cleared; rows that mean nothing without their parent (a rule version without
-- its rule, a reading of a survey that is gone, …) are removed. A rule scoped to a place that
-- no longer exists applied to nothing; it is removed with its alerts.
-- Placeholders, created only when needed.
INSERT INTO `areas` (`slug`, `name`) SELECT 'unassigned', 'Unassigned (hall missing)' FROM DUAL
  WHERE NOT EXISTS (SELECT 1 FROM `areas` WHERE `slug` = 'unassigned')
    AND (EXISTS (SELECT 1 FROM `lines` l WHERE NOT EXISTS (SELECT 1 FROM `areas` a WHERE a.`id` = l.`area_id`))
      OR EXISTS (SELECT 1 FROM `points` p WHERE NOT EXISTS (SELECT 1 FROM `lines` l WHERE l.`id` = p.`line_id`))
      OR EXISTS (SELECT 1 FROM `line_notes` n WHERE NOT EXISTS (SELECT 1 FROM `lines` l WHERE l.`id` = n.`line_id`))
      OR EXISTS (SELECT 1 FROM `survey_plans` s WHERE NOT EXISTS (SELECT 1 FROM `lines` l WHERE l.`id` = s.`line_id`))
      OR EXISTS (SELECT 1 FROM `surveys` s WHERE NOT EXISTS (SELECT 1 FROM `lines` l WHERE l.`id` = s.`line_id`)));--> statement-breakpoint
UPDATE `lines` l SET l.`area_id` = (SELECT a.`id` FROM `areas` a WHERE a.`slug` = 'unassigned') WHERE NOT EXISTS (SELECT 1 FROM `areas` a WHERE a.`id` = l.`area_id`);--> statement-breakpoint
INSERT INTO `lines` (`area_id`, `slug`, `name`, `kind`, `nominal_speed_mpm`)
  SELECT (SELECT a.`id` FROM `areas` a WHERE a.`slug` = 'unassigned'), 'unassigned', 'Unassigned (line missing)', 'other', 0 FROM DUAL
  WHERE EXISTS (SELECT 1 FROM `areas` a WHERE a.`slug` = 'unassigned')
    AND NOT EXISTS (SELECT 1 FROM `lines` l WHERE l.`slug` = 'unassigned')
    AND (EXISTS (SELECT 1 FROM `points` p WHERE NOT EXISTS (SELECT 1 FROM `lines` l WHERE l.`id` = p.`line_id`))
      OR EXISTS (SELECT 1 FROM `line_notes` n WHERE NOT EXISTS (SELECT 1 FROM `lines` l WHERE l.`id` = n.`line_id`))
      OR EXISTS (SELECT 1 FROM `survey_plans` s WHERE NOT EXISTS (SELECT 1 FROM `lines` l WHERE l.`id` = s.`line_id`))
      OR EXISTS (SELECT 1 FROM `surveys` s WHERE NOT EXISTS (SELECT 1 FROM `lines` l WHERE l.`id` = s.`line_id`)));--> statement-breakpoint
-- points keep their own id as position on the placeholder line, so (line, position) stays unique
UPDATE `points` p SET p.`position` = p.`id`, p.`line_id` = (SELECT l.`id` FROM `lines` l WHERE l.`slug` = 'unassigned') WHERE NOT EXISTS (SELECT 1 FROM `lines` l WHERE l.`id` = p.`line_id`);--> statement-breakpoint
UPDATE `line_notes` t SET t.`line_id` = (SELECT l.`id` FROM `lines` l WHERE l.`slug` = 'unassigned') WHERE NOT EXISTS (SELECT 1 FROM `lines` l WHERE l.`id` = t.`line_id`);--> statement-breakpoint
UPDATE `survey_plans` t SET t.`line_id` = (SELECT l.`id` FROM `lines` l WHERE l.`slug` = 'unassigned') WHERE NOT EXISTS (SELECT 1 FROM `lines` l WHERE l.`id` = t.`line_id`);--> statement-breakpoint
UPDATE `surveys` t SET t.`line_id` = (SELECT l.`id` FROM `lines` l WHERE l.`slug` = 'unassigned') WHERE NOT EXISTS (SELECT 1 FROM `lines` l WHERE l.`id` = t.`line_id`);--> statement-breakpoint
INSERT INTO `people` (`email`, `name`, `role`, `password_hash`, `active`, `created_at`, `updated_at`)
  SELECT 'former-person@stillfield.invalid', 'Former person', 'viewer', '!', false, CAST(UNIX_TIMESTAMP(NOW(3)) * 1000 AS UNSIGNED), CAST(UNIX_TIMESTAMP(NOW(3)) * 1000 AS UNSIGNED) FROM DUAL
  WHERE NOT EXISTS (SELECT 1 FROM `people` WHERE `email` = 'former-person@stillfield.invalid')
    AND (EXISTS (SELECT 1 FROM `oncall_shifts` t WHERE NOT EXISTS (SELECT 1 FROM `people` x WHERE x.`id` = t.`person_id`)) OR EXISTS (SELECT 1 FROM `line_notes` t WHERE NOT EXISTS (SELECT 1 FROM `people` x WHERE x.`id` = t.`person_id`)) OR EXISTS (SELECT 1 FROM `survey_actions` t WHERE NOT EXISTS (SELECT 1 FROM `people` x WHERE x.`id` = t.`owner_id`)));--> statement-breakpoint
-- an on-call shift of nobody pages nobody
DELETE FROM `oncall_shifts` WHERE NOT EXISTS (SELECT 1 FROM `people` x WHERE x.`id` = `oncall_shifts`.`person_id`);--> statement-breakpoint
UPDATE `line_notes` t SET t.`person_id` = (SELECT x.`id` FROM `people` x WHERE x.`email` = 'former-person@stillfield.invalid') WHERE NOT EXISTS (SELECT 1 FROM `people` x WHERE x.`id` = t.`person_id`);--> statement-breakpoint
UPDATE `survey_actions` t SET t.`owner_id` = (SELECT x.`id` FROM `people` x WHERE x.`email` = 'former-person@stillfield.invalid') WHERE NOT EXISTS (SELECT 1 FROM `people` x WHERE x.`id` = t.`owner_id`);--> statement-breakpoint
DELETE r FROM `rules` r WHERE (r.`point_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `points` x WHERE x.`id` = r.`point_id`)) OR (r.`line_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `lines` x WHERE x.`id` = r.`line_id`)) OR (r.`area_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `areas` x WHERE x.`id` = r.`area_id`)) OR (r.`device_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `devices` x WHERE x.`id` = r.`device_id`)) OR (r.`neutralizer_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `neutralizers` x WHERE x.`id` = r.`neutralizer_id`));--> statement-breakpoint
DELETE FROM `rule_versions` WHERE NOT EXISTS (SELECT 1 FROM `rules` x WHERE x.`id` = `rule_versions`.`rule_id`);--> statement-breakpoint
DELETE FROM `alert_events` WHERE `alert_id` IN (SELECT a.`id` FROM `alerts` a WHERE NOT EXISTS (SELECT 1 FROM `rules` x WHERE x.`id` = a.`rule_id`));--> statement-breakpoint
DELETE FROM `alerts` WHERE NOT EXISTS (SELECT 1 FROM `rules` x WHERE x.`id` = `alerts`.`rule_id`);--> statement-breakpoint
DELETE FROM `alert_events` WHERE NOT EXISTS (SELECT 1 FROM `alerts` x WHERE x.`id` = `alert_events`.`alert_id`);--> statement-breakpoint
DELETE FROM `checks` WHERE NOT EXISTS (SELECT 1 FROM `neutralizers` x WHERE x.`id` = `checks`.`neutralizer_id`);--> statement-breakpoint
DELETE FROM `survey_plan_versions` WHERE NOT EXISTS (SELECT 1 FROM `survey_plans` x WHERE x.`id` = `survey_plan_versions`.`plan_id`);--> statement-breakpoint
DELETE FROM `surveys` WHERE NOT EXISTS (SELECT 1 FROM `survey_plans` x WHERE x.`id` = `surveys`.`plan_id`);--> statement-breakpoint
DELETE FROM `survey_readings` WHERE NOT EXISTS (SELECT 1 FROM `surveys` x WHERE x.`id` = `survey_readings`.`survey_id`);--> statement-breakpoint
DELETE FROM `survey_photos` WHERE NOT EXISTS (SELECT 1 FROM `surveys` x WHERE x.`id` = `survey_photos`.`survey_id`);--> statement-breakpoint
DELETE FROM `survey_findings` WHERE NOT EXISTS (SELECT 1 FROM `surveys` x WHERE x.`id` = `survey_findings`.`survey_id`);--> statement-breakpoint
DELETE FROM `survey_actions` WHERE NOT EXISTS (SELECT 1 FROM `surveys` x WHERE x.`id` = `survey_actions`.`survey_id`);--> statement-breakpoint
DELETE FROM `meter_cross_checks` WHERE NOT EXISTS (SELECT 1 FROM `devices` x WHERE x.`id` = `meter_cross_checks`.`device_id`) OR NOT EXISTS (SELECT 1 FROM `surveys` x WHERE x.`id` = `meter_cross_checks`.`survey_id`) OR NOT EXISTS (SELECT 1 FROM `survey_readings` x WHERE x.`id` = `meter_cross_checks`.`reading_id`);--> statement-breakpoint
DELETE FROM `gateway_devices` WHERE NOT EXISTS (SELECT 1 FROM `edge_nodes` x WHERE x.`id` = `gateway_devices`.`edge_node_id`);--> statement-breakpoint
DELETE FROM `gateway_metrics` WHERE NOT EXISTS (SELECT 1 FROM `edge_nodes` x WHERE x.`id` = `gateway_metrics`.`edge_node_id`);--> statement-breakpoint
DELETE FROM `device_clocks` WHERE NOT EXISTS (SELECT 1 FROM `devices` x WHERE x.`id` = `device_clocks`.`device_id`);--> statement-breakpoint
-- a mapping to a device that is gone maps nothing
UPDATE `gateway_metrics` t SET t.`target_device_id` = NULL, t.`target_channel` = NULL WHERE t.`target_device_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `devices` x WHERE x.`id` = t.`target_device_id`);--> statement-breakpoint
-- optional links to a row that is gone are cleared
UPDATE `devices` t SET t.`point_id` = NULL WHERE t.`point_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `points` x WHERE x.`id` = t.`point_id`);--> statement-breakpoint
UPDATE `devices` t SET t.`area_id` = NULL WHERE t.`area_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `areas` x WHERE x.`id` = t.`area_id`);--> statement-breakpoint
UPDATE `devices` t SET t.`line_id` = NULL WHERE t.`line_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `lines` x WHERE x.`id` = t.`line_id`);--> statement-breakpoint
UPDATE `neutralizers` t SET t.`point_id` = NULL WHERE t.`point_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `points` x WHERE x.`id` = t.`point_id`);--> statement-breakpoint
UPDATE `audit_log` t SET t.`person_id` = NULL WHERE t.`person_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `people` x WHERE x.`id` = t.`person_id`);--> statement-breakpoint
UPDATE `alert_events` t SET t.`person_id` = NULL WHERE t.`person_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `people` x WHERE x.`id` = t.`person_id`);--> statement-breakpoint
UPDATE `alerts` t SET t.`area_id` = NULL WHERE t.`area_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `areas` x WHERE x.`id` = t.`area_id`);--> statement-breakpoint
UPDATE `alerts` t SET t.`line_id` = NULL WHERE t.`line_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `lines` x WHERE x.`id` = t.`line_id`);--> statement-breakpoint
UPDATE `alerts` t SET t.`point_id` = NULL WHERE t.`point_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `points` x WHERE x.`id` = t.`point_id`);--> statement-breakpoint
UPDATE `alerts` t SET t.`device_id` = NULL WHERE t.`device_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `devices` x WHERE x.`id` = t.`device_id`);--> statement-breakpoint
UPDATE `alerts` t SET t.`neutralizer_id` = NULL WHERE t.`neutralizer_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `neutralizers` x WHERE x.`id` = t.`neutralizer_id`);--> statement-breakpoint
UPDATE `alerts` t SET t.`acked_by` = NULL WHERE t.`acked_by` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `people` x WHERE x.`id` = t.`acked_by`);--> statement-breakpoint
UPDATE `line_notes` t SET t.`point_id` = NULL WHERE t.`point_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `points` x WHERE x.`id` = t.`point_id`);--> statement-breakpoint
UPDATE `rule_versions` t SET t.`created_by` = NULL WHERE t.`created_by` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `people` x WHERE x.`id` = t.`created_by`);--> statement-breakpoint
UPDATE `checks` t SET t.`person_id` = NULL WHERE t.`person_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `people` x WHERE x.`id` = t.`person_id`);--> statement-breakpoint
UPDATE `equipment_events` t SET t.`person_id` = NULL WHERE t.`person_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `people` x WHERE x.`id` = t.`person_id`);--> statement-breakpoint
UPDATE `equipment_events` t SET t.`check_id` = NULL WHERE t.`check_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `checks` x WHERE x.`id` = t.`check_id`);--> statement-breakpoint
UPDATE `equipment_events` t SET t.`upload_id` = NULL WHERE t.`upload_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `uploads` x WHERE x.`id` = t.`upload_id`);--> statement-breakpoint
UPDATE `imported_files` t SET t.`person_id` = NULL WHERE t.`person_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `people` x WHERE x.`id` = t.`person_id`);--> statement-breakpoint
UPDATE `uploads` t SET t.`person_id` = NULL WHERE t.`person_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `people` x WHERE x.`id` = t.`person_id`);--> statement-breakpoint
UPDATE `survey_plan_versions` t SET t.`person_id` = NULL WHERE t.`person_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `people` x WHERE x.`id` = t.`person_id`);--> statement-breakpoint
UPDATE `surveys` t SET t.`person_id` = NULL WHERE t.`person_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `people` x WHERE x.`id` = t.`person_id`);--> statement-breakpoint
UPDATE `surveys` t SET t.`resurvey_of_action_id` = NULL WHERE t.`resurvey_of_action_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `survey_actions` x WHERE x.`id` = t.`resurvey_of_action_id`);--> statement-breakpoint
UPDATE `survey_readings` t SET t.`point_id` = NULL WHERE t.`point_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `points` x WHERE x.`id` = t.`point_id`);--> statement-breakpoint
UPDATE `survey_readings` t SET t.`fixed_device_id` = NULL WHERE t.`fixed_device_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `devices` x WHERE x.`id` = t.`fixed_device_id`);--> statement-breakpoint
UPDATE `survey_photos` t SET t.`person_id` = NULL WHERE t.`person_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `people` x WHERE x.`id` = t.`person_id`);--> statement-breakpoint
UPDATE `survey_actions` t SET t.`finding_id` = NULL WHERE t.`finding_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `survey_findings` x WHERE x.`id` = t.`finding_id`);--> statement-breakpoint
UPDATE `survey_actions` t SET t.`created_by` = NULL WHERE t.`created_by` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `people` x WHERE x.`id` = t.`created_by`);--> statement-breakpoint
UPDATE `survey_actions` t SET t.`closed_by` = NULL WHERE t.`closed_by` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `people` x WHERE x.`id` = t.`closed_by`);--> statement-breakpoint
UPDATE `survey_actions` t SET t.`resurvey_id` = NULL WHERE t.`resurvey_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `surveys` x WHERE x.`id` = t.`resurvey_id`);--> statement-breakpoint
UPDATE `gateway_metrics` t SET t.`mapped_by` = NULL WHERE t.`mapped_by` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `people` x WHERE x.`id` = t.`mapped_by`);--> statement-breakpoint
UPDATE `gateway_rejections` t SET t.`edge_node_id` = NULL WHERE t.`edge_node_id` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `edge_nodes` x WHERE x.`id` = t.`edge_node_id`);--> statement-breakpoint
UPDATE `device_clocks` t SET t.`changed_by` = NULL WHERE t.`changed_by` IS NOT NULL AND NOT EXISTS (SELECT 1 FROM `people` x WHERE x.`id` = t.`changed_by`);--> statement-breakpoint
ALTER TABLE `audit_log` ADD CONSTRAINT `audit_log_person_id_people_id_fk` FOREIGN KEY (`person_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `devices` ADD CONSTRAINT `devices_point_id_points_id_fk` FOREIGN KEY (`point_id`) REFERENCES `points`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `devices` ADD CONSTRAINT `devices_area_id_areas_id_fk` FOREIGN KEY (`area_id`) REFERENCES `areas`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `devices` ADD CONSTRAINT `devices_line_id_lines_id_fk` FOREIGN KEY (`line_id`) REFERENCES `lines`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `lines` ADD CONSTRAINT `lines_area_id_areas_id_fk` FOREIGN KEY (`area_id`) REFERENCES `areas`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `neutralizers` ADD CONSTRAINT `neutralizers_point_id_points_id_fk` FOREIGN KEY (`point_id`) REFERENCES `points`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `points` ADD CONSTRAINT `points_line_id_lines_id_fk` FOREIGN KEY (`line_id`) REFERENCES `lines`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `alert_events` ADD CONSTRAINT `alert_events_alert_id_alerts_id_fk` FOREIGN KEY (`alert_id`) REFERENCES `alerts`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `alert_events` ADD CONSTRAINT `alert_events_person_id_people_id_fk` FOREIGN KEY (`person_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `alerts` ADD CONSTRAINT `alerts_rule_id_rules_id_fk` FOREIGN KEY (`rule_id`) REFERENCES `rules`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `alerts` ADD CONSTRAINT `alerts_area_id_areas_id_fk` FOREIGN KEY (`area_id`) REFERENCES `areas`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `alerts` ADD CONSTRAINT `alerts_line_id_lines_id_fk` FOREIGN KEY (`line_id`) REFERENCES `lines`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `alerts` ADD CONSTRAINT `alerts_point_id_points_id_fk` FOREIGN KEY (`point_id`) REFERENCES `points`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `alerts` ADD CONSTRAINT `alerts_device_id_devices_id_fk` FOREIGN KEY (`device_id`) REFERENCES `devices`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `alerts` ADD CONSTRAINT `alerts_neutralizer_id_neutralizers_id_fk` FOREIGN KEY (`neutralizer_id`) REFERENCES `neutralizers`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `alerts` ADD CONSTRAINT `alerts_acked_by_people_id_fk` FOREIGN KEY (`acked_by`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `line_notes` ADD CONSTRAINT `line_notes_line_id_lines_id_fk` FOREIGN KEY (`line_id`) REFERENCES `lines`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `line_notes` ADD CONSTRAINT `line_notes_point_id_points_id_fk` FOREIGN KEY (`point_id`) REFERENCES `points`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `line_notes` ADD CONSTRAINT `line_notes_person_id_people_id_fk` FOREIGN KEY (`person_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `oncall_shifts` ADD CONSTRAINT `oncall_shifts_person_id_people_id_fk` FOREIGN KEY (`person_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `rule_versions` ADD CONSTRAINT `rule_versions_rule_id_rules_id_fk` FOREIGN KEY (`rule_id`) REFERENCES `rules`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `rule_versions` ADD CONSTRAINT `rule_versions_created_by_people_id_fk` FOREIGN KEY (`created_by`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `rules` ADD CONSTRAINT `rules_point_id_points_id_fk` FOREIGN KEY (`point_id`) REFERENCES `points`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `rules` ADD CONSTRAINT `rules_line_id_lines_id_fk` FOREIGN KEY (`line_id`) REFERENCES `lines`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `rules` ADD CONSTRAINT `rules_area_id_areas_id_fk` FOREIGN KEY (`area_id`) REFERENCES `areas`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `rules` ADD CONSTRAINT `rules_device_id_devices_id_fk` FOREIGN KEY (`device_id`) REFERENCES `devices`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `rules` ADD CONSTRAINT `rules_neutralizer_id_neutralizers_id_fk` FOREIGN KEY (`neutralizer_id`) REFERENCES `neutralizers`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `checks` ADD CONSTRAINT `checks_neutralizer_id_neutralizers_id_fk` FOREIGN KEY (`neutralizer_id`) REFERENCES `neutralizers`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `checks` ADD CONSTRAINT `checks_person_id_people_id_fk` FOREIGN KEY (`person_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `equipment_events` ADD CONSTRAINT `equipment_events_person_id_people_id_fk` FOREIGN KEY (`person_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `equipment_events` ADD CONSTRAINT `equipment_events_check_id_checks_id_fk` FOREIGN KEY (`check_id`) REFERENCES `checks`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `equipment_events` ADD CONSTRAINT `equipment_events_upload_id_uploads_id_fk` FOREIGN KEY (`upload_id`) REFERENCES `uploads`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `imported_files` ADD CONSTRAINT `imported_files_person_id_people_id_fk` FOREIGN KEY (`person_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `uploads` ADD CONSTRAINT `uploads_person_id_people_id_fk` FOREIGN KEY (`person_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `meter_cross_checks` ADD CONSTRAINT `meter_cross_checks_device_id_devices_id_fk` FOREIGN KEY (`device_id`) REFERENCES `devices`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `meter_cross_checks` ADD CONSTRAINT `meter_cross_checks_survey_id_surveys_id_fk` FOREIGN KEY (`survey_id`) REFERENCES `surveys`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `meter_cross_checks` ADD CONSTRAINT `meter_cross_checks_reading_id_survey_readings_id_fk` FOREIGN KEY (`reading_id`) REFERENCES `survey_readings`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `survey_actions` ADD CONSTRAINT `survey_actions_survey_id_surveys_id_fk` FOREIGN KEY (`survey_id`) REFERENCES `surveys`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `survey_actions` ADD CONSTRAINT `survey_actions_finding_id_survey_findings_id_fk` FOREIGN KEY (`finding_id`) REFERENCES `survey_findings`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `survey_actions` ADD CONSTRAINT `survey_actions_owner_id_people_id_fk` FOREIGN KEY (`owner_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `survey_actions` ADD CONSTRAINT `survey_actions_created_by_people_id_fk` FOREIGN KEY (`created_by`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `survey_actions` ADD CONSTRAINT `survey_actions_closed_by_people_id_fk` FOREIGN KEY (`closed_by`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `survey_actions` ADD CONSTRAINT `survey_actions_resurvey_id_surveys_id_fk` FOREIGN KEY (`resurvey_id`) REFERENCES `surveys`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `survey_findings` ADD CONSTRAINT `survey_findings_survey_id_surveys_id_fk` FOREIGN KEY (`survey_id`) REFERENCES `surveys`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `survey_photos` ADD CONSTRAINT `survey_photos_survey_id_surveys_id_fk` FOREIGN KEY (`survey_id`) REFERENCES `surveys`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `survey_photos` ADD CONSTRAINT `survey_photos_person_id_people_id_fk` FOREIGN KEY (`person_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `survey_plan_versions` ADD CONSTRAINT `survey_plan_versions_plan_id_survey_plans_id_fk` FOREIGN KEY (`plan_id`) REFERENCES `survey_plans`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `survey_plan_versions` ADD CONSTRAINT `survey_plan_versions_person_id_people_id_fk` FOREIGN KEY (`person_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `survey_plans` ADD CONSTRAINT `survey_plans_line_id_lines_id_fk` FOREIGN KEY (`line_id`) REFERENCES `lines`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `survey_readings` ADD CONSTRAINT `survey_readings_survey_id_surveys_id_fk` FOREIGN KEY (`survey_id`) REFERENCES `surveys`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `survey_readings` ADD CONSTRAINT `survey_readings_point_id_points_id_fk` FOREIGN KEY (`point_id`) REFERENCES `points`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `survey_readings` ADD CONSTRAINT `survey_readings_fixed_device_id_devices_id_fk` FOREIGN KEY (`fixed_device_id`) REFERENCES `devices`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `surveys` ADD CONSTRAINT `surveys_plan_id_survey_plans_id_fk` FOREIGN KEY (`plan_id`) REFERENCES `survey_plans`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `surveys` ADD CONSTRAINT `surveys_line_id_lines_id_fk` FOREIGN KEY (`line_id`) REFERENCES `lines`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `surveys` ADD CONSTRAINT `surveys_person_id_people_id_fk` FOREIGN KEY (`person_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `surveys` ADD CONSTRAINT `surveys_resurvey_of_action_id_survey_actions_id_fk` FOREIGN KEY (`resurvey_of_action_id`) REFERENCES `survey_actions`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `device_clocks` ADD CONSTRAINT `device_clocks_device_id_devices_id_fk` FOREIGN KEY (`device_id`) REFERENCES `devices`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `device_clocks` ADD CONSTRAINT `device_clocks_changed_by_people_id_fk` FOREIGN KEY (`changed_by`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `gateway_devices` ADD CONSTRAINT `gateway_devices_edge_node_id_edge_nodes_id_fk` FOREIGN KEY (`edge_node_id`) REFERENCES `edge_nodes`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `gateway_metrics` ADD CONSTRAINT `gateway_metrics_edge_node_id_edge_nodes_id_fk` FOREIGN KEY (`edge_node_id`) REFERENCES `edge_nodes`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `gateway_metrics` ADD CONSTRAINT `gateway_metrics_target_device_id_devices_id_fk` FOREIGN KEY (`target_device_id`) REFERENCES `devices`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `gateway_metrics` ADD CONSTRAINT `gateway_metrics_mapped_by_people_id_fk` FOREIGN KEY (`mapped_by`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `gateway_rejections` ADD CONSTRAINT `gateway_rejections_edge_node_id_edge_nodes_id_fk` FOREIGN KEY (`edge_node_id`) REFERENCES `edge_nodes`(`id`) ON DELETE no action ON UPDATE no action;