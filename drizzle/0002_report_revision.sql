ALTER TABLE `checks` ADD `report_rev` integer DEFAULT 0 NOT NULL;--> statement-breakpoint
CREATE TRIGGER `checks_report_rev` AFTER UPDATE OF `report_json` ON `checks`
WHEN NEW.`report_json` IS NOT OLD.`report_json`
BEGIN
	UPDATE `checks` SET `report_rev` = OLD.`report_rev` + 1 WHERE `id` = NEW.`id`;
END;
