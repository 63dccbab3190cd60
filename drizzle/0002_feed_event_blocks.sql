CREATE TABLE `calendar_event_blocks` (
	`workspace_id` bigint unsigned NOT NULL,
	`key_hash` varchar(64) NOT NULL,
	`body` text NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `calendar_event_blocks_workspace_id_key_hash_pk` PRIMARY KEY(`workspace_id`,`key_hash`)
);
--> statement-breakpoint
ALTER TABLE `calendar_event_blocks` ADD CONSTRAINT `calendar_event_blocks_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `calendar_event_blocks_age_idx` ON `calendar_event_blocks` (`workspace_id`,`created_at`);