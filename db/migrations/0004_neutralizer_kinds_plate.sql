-- Neutralizer kinds told apart (lib/physics/neutralizer-kinds.ts): widen the enum to hold old and
-- new values, map the old kinds, then narrow it to the new list. An unspecified bar without air
-- becomes an AC bar (the shortest range and fastest decay default, so no warning goes quiet) and
-- its history says so; a bar recorded with air becomes an air-assisted bar.
ALTER TABLE `neutralizers` MODIFY COLUMN `kind` enum('ionizing_bar','ionized_air_blower','ionizing_nozzle','ac_bar','pulsed_dc_bar','steady_dc_bar','air_assisted_bar','blower','nozzle','passive_cord','other') NOT NULL;--> statement-breakpoint
INSERT INTO `equipment_events` (`subject_type`, `subject_id`, `ts`, `kind`, `person_id`, `text`) SELECT 'neutralizer', `id`, CAST(UNIX_TIMESTAMP(NOW(3)) * 1000 AS UNSIGNED), 'edited', NULL, CONCAT('Kind "ionizing bar" recorded as ', IF(`air_assisted`, 'air-assisted bar', 'AC ionizing bar'), ' when bars were split into AC, pulsed-DC, steady-DC and air-assisted: check the kind, it sets the mounting range and the decay-time limit.') FROM `neutralizers` WHERE `kind` = 'ionizing_bar';--> statement-breakpoint
UPDATE `neutralizers` SET `kind` = IF(`air_assisted`, 'air_assisted_bar', 'ac_bar') WHERE `kind` = 'ionizing_bar';--> statement-breakpoint
UPDATE `neutralizers` SET `kind` = 'blower' WHERE `kind` = 'ionized_air_blower';--> statement-breakpoint
UPDATE `neutralizers` SET `kind` = 'nozzle' WHERE `kind` = 'ionizing_nozzle';--> statement-breakpoint
ALTER TABLE `neutralizers` MODIFY COLUMN `kind` enum('ac_bar','pulsed_dc_bar','steady_dc_bar','air_assisted_bar','blower','nozzle','passive_cord','other') NOT NULL;--> statement-breakpoint
-- Plant check limits keyed by kind: blowers, nozzles and "other" keep theirs under the new names.
-- The old bar limit was one figure for bars of every kind (the 20 s that let a 1–2 s bar slow
-- tenfold); bars now start from their kind's default until the plant sets them again.
UPDATE `settings` SET `value` = JSON_REMOVE(JSON_SET(`value`, '$.byKind.blower', JSON_QUERY(`value`, '$.byKind.ionized_air_blower'), '$.byKind.nozzle', JSON_QUERY(`value`, '$.byKind.ionizing_nozzle')), '$.byKind.ionized_air_blower', '$.byKind.ionizing_nozzle', '$.byKind.ionizing_bar') WHERE `key` = 'check_limits';--> statement-breakpoint
ALTER TABLE `checks` ADD `plate_capacitance_pf` double;--> statement-breakpoint
ALTER TABLE `checks` ADD `plate_width_mm` double;--> statement-breakpoint
ALTER TABLE `checks` ADD `plate_length_mm` double;
