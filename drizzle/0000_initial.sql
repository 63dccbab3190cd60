CREATE TABLE `email_tokens` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`purpose` enum('password_reset','signup_confirm') NOT NULL,
	`token_hash` varchar(64) NOT NULL,
	`email` varchar(254) NOT NULL,
	`user_id` bigint unsigned,
	`payload` json,
	`expires_at` datetime(3) NOT NULL,
	`used_at` datetime(3),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `email_tokens_id` PRIMARY KEY(`id`),
	CONSTRAINT `email_tokens_token_uq` UNIQUE(`token_hash`)
);
--> statement-breakpoint
CREATE TABLE `invitations` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`workspace_id` bigint unsigned NOT NULL,
	`email` varchar(254) NOT NULL,
	`role` enum('manager','planner','distiller','staff') NOT NULL,
	`token_hash` varchar(64) NOT NULL,
	`invited_by` bigint unsigned,
	`expires_at` datetime(3) NOT NULL,
	`accepted_at` datetime(3),
	`revoked_at` datetime(3),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `invitations_id` PRIMARY KEY(`id`),
	CONSTRAINT `invitations_token_uq` UNIQUE(`token_hash`)
);
--> statement-breakpoint
CREATE TABLE `memberships` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`workspace_id` bigint unsigned NOT NULL,
	`user_id` bigint unsigned NOT NULL,
	`role` enum('manager','planner','distiller','staff') NOT NULL,
	`notify_prefs` json,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `memberships_id` PRIMARY KEY(`id`),
	CONSTRAINT `memberships_ws_user_uq` UNIQUE(`workspace_id`,`user_id`)
);
--> statement-breakpoint
CREATE TABLE `sessions` (
	`id` varchar(255) NOT NULL,
	`user_id` bigint unsigned NOT NULL,
	`expires_at` datetime(3) NOT NULL,
	`workspace_id` bigint unsigned,
	`created_at` datetime(3) NOT NULL,
	`user_agent` varchar(255),
	CONSTRAINT `sessions_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `sign_in_throttle` (
	`throttle_key` varchar(300) NOT NULL,
	`failures` int NOT NULL DEFAULT 0,
	`window_started_at` datetime(3) NOT NULL,
	`blocked_until` datetime(3),
	CONSTRAINT `sign_in_throttle_throttle_key` PRIMARY KEY(`throttle_key`)
);
--> statement-breakpoint
CREATE TABLE `users` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`email` varchar(254) NOT NULL,
	`name` varchar(120) NOT NULL,
	`password_hash` varchar(255) NOT NULL,
	`email_verified_at` datetime(3),
	`disabled_at` datetime(3),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `users_id` PRIMARY KEY(`id`),
	CONSTRAINT `users_email_uq` UNIQUE(`email`)
);
--> statement-breakpoint
CREATE TABLE `workspaces` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`name` varchar(120) NOT NULL,
	`time_zone` varchar(64) NOT NULL DEFAULT 'Europe/London',
	`units` enum('metric','us') NOT NULL DEFAULT 'metric',
	`calibration_temp_c` double NOT NULL DEFAULT 20,
	`stable_days` int NOT NULL DEFAULT 3,
	`stable_tolerance` double NOT NULL DEFAULT 0.001,
	`wort_correction_factor` double NOT NULL DEFAULT 1.04,
	`is_demo` boolean NOT NULL DEFAULT false,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `workspaces_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `ferment_forecasts` (
	`ferment_id` bigint unsigned NOT NULL,
	`workspace_id` bigint unsigned NOT NULL,
	`input_key` varchar(64) NOT NULL,
	`status` varchar(24) NOT NULL,
	`ready_at` datetime(3),
	`ready_p10` datetime(3),
	`ready_p90` datetime(3),
	`rule_met_at` datetime(3),
	`predicted_fg` double,
	`payload` json NOT NULL,
	`computed_at` datetime(3) NOT NULL,
	CONSTRAINT `ferment_forecasts_ferment_id` PRIMARY KEY(`ferment_id`)
);
--> statement-breakpoint
CREATE TABLE `ferment_ingredients` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`workspace_id` bigint unsigned NOT NULL,
	`ferment_id` bigint unsigned NOT NULL,
	`name` varchar(120) NOT NULL,
	`quantity_kg` double NOT NULL,
	CONSTRAINT `ferment_ingredients_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `fermenters` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`workspace_id` bigint unsigned NOT NULL,
	`name` varchar(80) NOT NULL,
	`capacity_litres` double NOT NULL,
	`position` int NOT NULL DEFAULT 0,
	`active` boolean NOT NULL DEFAULT true,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `fermenters_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `ferments` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`workspace_id` bigint unsigned NOT NULL,
	`code` varchar(40) NOT NULL,
	`wash_type_id` bigint unsigned NOT NULL,
	`fermenter_id` bigint unsigned,
	`volume_litres` double NOT NULL,
	`pitched_at` datetime(3) NOT NULL,
	`og` double NOT NULL,
	`yeast` varchar(120),
	`notes` text,
	`emptied_at` datetime(3),
	`emptied_reason` enum('distilled','dumped'),
	`created_by` bigint unsigned,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `ferments_id` PRIMARY KEY(`id`),
	CONSTRAINT `ferments_ws_code_uq` UNIQUE(`workspace_id`,`code`)
);
--> statement-breakpoint
CREATE TABLE `forecast_history` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`workspace_id` bigint unsigned NOT NULL,
	`ferment_id` bigint unsigned NOT NULL,
	`as_of` datetime(3) NOT NULL,
	`status` varchar(24) NOT NULL,
	`ready_at` datetime(3),
	`ready_p10` datetime(3),
	`ready_p90` datetime(3),
	CONSTRAINT `forecast_history_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `reading_uploads` (
	`id` varchar(64) NOT NULL,
	`workspace_id` bigint unsigned NOT NULL,
	`ferment_id` bigint unsigned NOT NULL,
	`user_id` bigint unsigned,
	`accepted` json NOT NULL,
	`summary` json NOT NULL,
	`expires_at` datetime(3) NOT NULL,
	`committed_at` datetime(3),
	`created_at` datetime(3) NOT NULL,
	CONSTRAINT `reading_uploads_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `readings` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`workspace_id` bigint unsigned NOT NULL,
	`ferment_id` bigint unsigned NOT NULL,
	`taken_at` datetime(3) NOT NULL,
	`method` enum('hydrometer','refractometer','digital') NOT NULL,
	`raw_value` double NOT NULL,
	`raw_unit` enum('sg','brix','plato') NOT NULL,
	`sample_temp_c` double,
	`sample_temp_unit` enum('C','F'),
	`corrected_sg` double NOT NULL,
	`low_confidence` boolean NOT NULL DEFAULT false,
	`source` enum('manual','upload') NOT NULL DEFAULT 'manual',
	`upload_id` varchar(64),
	`ferment_temp_c` double,
	`ph` double,
	`note` varchar(500),
	`taken_by` bigint unsigned,
	`deleted_at` datetime(3),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `readings_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `run_feeds` (
	`run_id` bigint unsigned NOT NULL,
	`feed_run_id` bigint unsigned NOT NULL,
	`workspace_id` bigint unsigned NOT NULL,
	`litres` double NOT NULL,
	CONSTRAINT `run_feeds_run_id_feed_run_id_pk` PRIMARY KEY(`run_id`,`feed_run_id`)
);
--> statement-breakpoint
CREATE TABLE `run_ferments` (
	`run_id` bigint unsigned NOT NULL,
	`ferment_id` bigint unsigned NOT NULL,
	`workspace_id` bigint unsigned NOT NULL,
	`litres` double NOT NULL,
	CONSTRAINT `run_ferments_run_id_ferment_id_pk` PRIMARY KEY(`run_id`,`ferment_id`)
);
--> statement-breakpoint
CREATE TABLE `run_outcomes` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`workspace_id` bigint unsigned NOT NULL,
	`run_id` bigint unsigned NOT NULL,
	`fraction` enum('low_wines','heads','hearts','tails','feints') NOT NULL,
	`volume_litres` double NOT NULL,
	`alcoholmeter_reading` double NOT NULL,
	`reading_temp_c` double NOT NULL,
	`abv_20` double NOT NULL,
	`laa` double NOT NULL,
	`cut_note` varchar(200),
	`recorded_by` bigint unsigned,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `run_outcomes_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `runs` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`workspace_id` bigint unsigned NOT NULL,
	`still_id` bigint unsigned NOT NULL,
	`type` enum('stripping','spirit','redistillation','cleaning','maintenance') NOT NULL,
	`status` enum('planned','confirmed','running','done','cancelled') NOT NULL DEFAULT 'planned',
	`starts_at` datetime(3) NOT NULL,
	`ends_at` datetime(3) NOT NULL,
	`operator_id` bigint unsigned,
	`charge_litres` double,
	`charge_abv` double,
	`version` int NOT NULL DEFAULT 1,
	`sequence` int NOT NULL DEFAULT 0,
	`notes` text,
	`started_at` datetime(3),
	`finished_at` datetime(3),
	`created_by` bigint unsigned,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `runs_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `still_closures` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`workspace_id` bigint unsigned NOT NULL,
	`still_id` bigint unsigned,
	`starts_on` date NOT NULL,
	`ends_on` date NOT NULL,
	`reason` varchar(160) NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `still_closures_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `stills` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`workspace_id` bigint unsigned NOT NULL,
	`name` varchar(80) NOT NULL,
	`kind` enum('pot','column','reflux') NOT NULL,
	`capacity_litres` double NOT NULL,
	`heating_kw` double NOT NULL,
	`operating_hours` json NOT NULL,
	`cleaning_after_run_minutes` int NOT NULL DEFAULT 0,
	`typical_minutes` json NOT NULL,
	`position` int NOT NULL DEFAULT 0,
	`active` boolean NOT NULL DEFAULT true,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `stills_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `wash_types` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`workspace_id` bigint unsigned NOT NULL,
	`name` varchar(80) NOT NULL,
	`category` enum('sugar','grain','molasses','fruit','other') NOT NULL,
	`terminal_min` double NOT NULL,
	`terminal_max` double NOT NULL,
	`typical_og` double,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `wash_types_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `audit_log` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`workspace_id` bigint unsigned,
	`user_id` bigint unsigned,
	`action` varchar(60) NOT NULL,
	`entity_type` varchar(40),
	`entity_id` varchar(64),
	`details` json,
	`ip` varchar(64),
	`created_at` datetime(3) NOT NULL,
	CONSTRAINT `audit_log_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `calendar_feeds` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`workspace_id` bigint unsigned NOT NULL,
	`scope` enum('workspace','still','person') NOT NULL,
	`still_id` bigint unsigned,
	`person_id` bigint unsigned,
	`name` varchar(120) NOT NULL,
	`token_hash` varchar(64) NOT NULL,
	`created_by` bigint unsigned,
	`revoked_at` datetime(3),
	`last_fetched_at` datetime(3),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `calendar_feeds_id` PRIMARY KEY(`id`),
	CONSTRAINT `calendar_feeds_token_uq` UNIQUE(`token_hash`)
);
--> statement-breakpoint
CREATE TABLE `mail_outbox` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`workspace_id` bigint unsigned,
	`kind` varchar(40) NOT NULL,
	`to_address` varchar(254) NOT NULL,
	`subject` varchar(250) NOT NULL,
	`text_body` text NOT NULL,
	`html_body` text NOT NULL,
	`message_id` varchar(200) NOT NULL,
	`status` enum('pending','sent','failed') NOT NULL DEFAULT 'pending',
	`attempts` int NOT NULL DEFAULT 0,
	`next_attempt_at` datetime(3) NOT NULL,
	`claimed_by` varchar(80),
	`claim_until` datetime(3),
	`last_error` varchar(500),
	`sent_at` datetime(3),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `mail_outbox_id` PRIMARY KEY(`id`),
	CONSTRAINT `mail_outbox_msgid_uq` UNIQUE(`message_id`)
);
--> statement-breakpoint
ALTER TABLE `email_tokens` ADD CONSTRAINT `email_tokens_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `invitations` ADD CONSTRAINT `invitations_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `invitations` ADD CONSTRAINT `invitations_invited_by_users_id_fk` FOREIGN KEY (`invited_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `memberships` ADD CONSTRAINT `memberships_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `memberships` ADD CONSTRAINT `memberships_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `sessions` ADD CONSTRAINT `sessions_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `sessions` ADD CONSTRAINT `sessions_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `ferment_forecasts` ADD CONSTRAINT `ferment_forecasts_ferment_id_ferments_id_fk` FOREIGN KEY (`ferment_id`) REFERENCES `ferments`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `ferment_forecasts` ADD CONSTRAINT `ferment_forecasts_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `ferment_ingredients` ADD CONSTRAINT `ferment_ingredients_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `ferment_ingredients` ADD CONSTRAINT `ferment_ingredients_ferment_id_ferments_id_fk` FOREIGN KEY (`ferment_id`) REFERENCES `ferments`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `fermenters` ADD CONSTRAINT `fermenters_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `ferments` ADD CONSTRAINT `ferments_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `ferments` ADD CONSTRAINT `ferments_wash_type_id_wash_types_id_fk` FOREIGN KEY (`wash_type_id`) REFERENCES `wash_types`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `ferments` ADD CONSTRAINT `ferments_fermenter_id_fermenters_id_fk` FOREIGN KEY (`fermenter_id`) REFERENCES `fermenters`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `ferments` ADD CONSTRAINT `ferments_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `forecast_history` ADD CONSTRAINT `forecast_history_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `forecast_history` ADD CONSTRAINT `forecast_history_ferment_id_ferments_id_fk` FOREIGN KEY (`ferment_id`) REFERENCES `ferments`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `reading_uploads` ADD CONSTRAINT `reading_uploads_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `reading_uploads` ADD CONSTRAINT `reading_uploads_ferment_id_ferments_id_fk` FOREIGN KEY (`ferment_id`) REFERENCES `ferments`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `reading_uploads` ADD CONSTRAINT `reading_uploads_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `readings` ADD CONSTRAINT `readings_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `readings` ADD CONSTRAINT `readings_ferment_id_ferments_id_fk` FOREIGN KEY (`ferment_id`) REFERENCES `ferments`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `readings` ADD CONSTRAINT `readings_taken_by_users_id_fk` FOREIGN KEY (`taken_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `run_feeds` ADD CONSTRAINT `run_feeds_run_id_runs_id_fk` FOREIGN KEY (`run_id`) REFERENCES `runs`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `run_feeds` ADD CONSTRAINT `run_feeds_feed_run_id_runs_id_fk` FOREIGN KEY (`feed_run_id`) REFERENCES `runs`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `run_feeds` ADD CONSTRAINT `run_feeds_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `run_ferments` ADD CONSTRAINT `run_ferments_run_id_runs_id_fk` FOREIGN KEY (`run_id`) REFERENCES `runs`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `run_ferments` ADD CONSTRAINT `run_ferments_ferment_id_ferments_id_fk` FOREIGN KEY (`ferment_id`) REFERENCES `ferments`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `run_ferments` ADD CONSTRAINT `run_ferments_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `run_outcomes` ADD CONSTRAINT `run_outcomes_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `run_outcomes` ADD CONSTRAINT `run_outcomes_run_id_runs_id_fk` FOREIGN KEY (`run_id`) REFERENCES `runs`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `run_outcomes` ADD CONSTRAINT `run_outcomes_recorded_by_users_id_fk` FOREIGN KEY (`recorded_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `runs` ADD CONSTRAINT `runs_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `runs` ADD CONSTRAINT `runs_still_id_stills_id_fk` FOREIGN KEY (`still_id`) REFERENCES `stills`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `runs` ADD CONSTRAINT `runs_operator_id_users_id_fk` FOREIGN KEY (`operator_id`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `runs` ADD CONSTRAINT `runs_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `still_closures` ADD CONSTRAINT `still_closures_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `still_closures` ADD CONSTRAINT `still_closures_still_id_stills_id_fk` FOREIGN KEY (`still_id`) REFERENCES `stills`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `stills` ADD CONSTRAINT `stills_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `wash_types` ADD CONSTRAINT `wash_types_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `audit_log` ADD CONSTRAINT `audit_log_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `audit_log` ADD CONSTRAINT `audit_log_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `calendar_feeds` ADD CONSTRAINT `calendar_feeds_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `calendar_feeds` ADD CONSTRAINT `calendar_feeds_still_id_stills_id_fk` FOREIGN KEY (`still_id`) REFERENCES `stills`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `calendar_feeds` ADD CONSTRAINT `calendar_feeds_person_id_users_id_fk` FOREIGN KEY (`person_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `calendar_feeds` ADD CONSTRAINT `calendar_feeds_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `mail_outbox` ADD CONSTRAINT `mail_outbox_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `invitations_ws_idx` ON `invitations` (`workspace_id`);--> statement-breakpoint
CREATE INDEX `memberships_user_idx` ON `memberships` (`user_id`);--> statement-breakpoint
CREATE INDEX `sessions_user_idx` ON `sessions` (`user_id`);--> statement-breakpoint
CREATE INDEX `forecasts_ws_idx` ON `ferment_forecasts` (`workspace_id`);--> statement-breakpoint
CREATE INDEX `ingredients_ferment_idx` ON `ferment_ingredients` (`ferment_id`);--> statement-breakpoint
CREATE INDEX `fermenters_ws_idx` ON `fermenters` (`workspace_id`);--> statement-breakpoint
CREATE INDEX `ferments_ws_pitched_idx` ON `ferments` (`workspace_id`,`pitched_at`);--> statement-breakpoint
CREATE INDEX `ferments_fermenter_idx` ON `ferments` (`fermenter_id`,`emptied_at`);--> statement-breakpoint
CREATE INDEX `forecast_history_ferment_idx` ON `forecast_history` (`ferment_id`,`as_of`);--> statement-breakpoint
CREATE INDEX `readings_ferment_time_idx` ON `readings` (`ferment_id`,`taken_at`);--> statement-breakpoint
CREATE INDEX `readings_ws_idx` ON `readings` (`workspace_id`);--> statement-breakpoint
CREATE INDEX `run_feeds_feed_idx` ON `run_feeds` (`feed_run_id`);--> statement-breakpoint
CREATE INDEX `run_ferments_ferment_idx` ON `run_ferments` (`ferment_id`);--> statement-breakpoint
CREATE INDEX `run_outcomes_run_idx` ON `run_outcomes` (`run_id`);--> statement-breakpoint
CREATE INDEX `runs_still_time_idx` ON `runs` (`still_id`,`starts_at`,`ends_at`);--> statement-breakpoint
CREATE INDEX `runs_ws_time_idx` ON `runs` (`workspace_id`,`starts_at`);--> statement-breakpoint
CREATE INDEX `closures_ws_idx` ON `still_closures` (`workspace_id`,`starts_on`);--> statement-breakpoint
CREATE INDEX `stills_ws_idx` ON `stills` (`workspace_id`,`position`);--> statement-breakpoint
CREATE INDEX `wash_types_ws_idx` ON `wash_types` (`workspace_id`);--> statement-breakpoint
CREATE INDEX `audit_ws_time_idx` ON `audit_log` (`workspace_id`,`created_at`);--> statement-breakpoint
CREATE INDEX `audit_action_idx` ON `audit_log` (`workspace_id`,`action`);--> statement-breakpoint
CREATE INDEX `calendar_feeds_ws_idx` ON `calendar_feeds` (`workspace_id`);--> statement-breakpoint
CREATE INDEX `mail_outbox_due_idx` ON `mail_outbox` (`status`,`next_attempt_at`);