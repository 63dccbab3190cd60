CREATE TABLE `job_claims` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`workspace_id` bigint unsigned NOT NULL,
	`job` varchar(40) NOT NULL,
	`job_key` varchar(120) NOT NULL,
	`claimed_by` varchar(80) NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `job_claims_id` PRIMARY KEY(`id`),
	CONSTRAINT `job_claims_uq` UNIQUE(`workspace_id`,`job`,`job_key`)
);
--> statement-breakpoint
ALTER TABLE `job_claims` ADD CONSTRAINT `job_claims_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;