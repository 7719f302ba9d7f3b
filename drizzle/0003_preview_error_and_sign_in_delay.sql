ALTER TABLE `photos` ADD `preview_error` text;--> statement-breakpoint
ALTER TABLE `rate_limits` ADD `blocked_until` integer;