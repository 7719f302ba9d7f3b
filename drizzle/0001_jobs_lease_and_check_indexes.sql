CREATE INDEX `jobs_lease_idx` ON `jobs` (`status`,`lease_expires_at`);--> statement-breakpoint
CREATE INDEX `jobs_check_idx` ON `jobs` (`check_id`);