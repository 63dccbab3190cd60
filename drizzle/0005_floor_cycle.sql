ALTER TABLE `workspaces` ADD `number_format` enum('point','comma') DEFAULT 'point' NOT NULL;--> statement-breakpoint
ALTER TABLE `workspaces` ADD `at_risk_threshold` double DEFAULT 0.8 NOT NULL;--> statement-breakpoint
ALTER TABLE `workspaces` ADD `start_early_margin_minutes` int DEFAULT 60 NOT NULL;--> statement-breakpoint
ALTER TABLE `workspaces` ADD `release_fermenters_on` enum('finish','start') DEFAULT 'finish' NOT NULL;--> statement-breakpoint
ALTER TABLE `workspaces` ADD `booking_horizon_days` int DEFAULT 365 NOT NULL;--> statement-breakpoint
ALTER TABLE `workspaces` ADD `setup_dismissed_at` datetime(3);--> statement-breakpoint
ALTER TABLE `ferments` ADD `emptied_by_run_id` bigint unsigned;--> statement-breakpoint
ALTER TABLE `ferments` ADD `emptied_note` varchar(200);--> statement-breakpoint
ALTER TABLE `readings` ADD `review_reason` varchar(200);--> statement-breakpoint
ALTER TABLE `runs` ADD `booked_at_risk` boolean DEFAULT false NOT NULL;--> statement-breakpoint
ALTER TABLE `ferments` ADD CONSTRAINT `ferments_emptied_by_run_id_runs_id_fk` FOREIGN KEY (`emptied_by_run_id`) REFERENCES `runs`(`id`) ON DELETE set null ON UPDATE no action;