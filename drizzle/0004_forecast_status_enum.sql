-- The forecast status becomes an enum of FORECAST_STATUSES (src/lib/vocabulary/forecast.ts).
-- Every status ever written is already in that list; a row holding anything else is mapped
-- first to 'insufficient_data' (the neutral state), and its cached forecast is marked stale
-- (empty input key) so it is computed again on the next read.
UPDATE `ferment_forecasts` SET `status` = 'insufficient_data', `input_key` = '' WHERE `status` NOT IN ('insufficient_data','lag','active','slowing','finished','stalled','souring');--> statement-breakpoint
UPDATE `forecast_history` SET `status` = 'insufficient_data' WHERE `status` NOT IN ('insufficient_data','lag','active','slowing','finished','stalled','souring');--> statement-breakpoint
ALTER TABLE `ferment_forecasts` MODIFY COLUMN `status` enum('insufficient_data','lag','active','slowing','finished','stalled','souring') NOT NULL;--> statement-breakpoint
ALTER TABLE `forecast_history` MODIFY COLUMN `status` enum('insufficient_data','lag','active','slowing','finished','stalled','souring') NOT NULL;
