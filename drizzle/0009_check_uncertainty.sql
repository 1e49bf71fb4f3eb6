ALTER TABLE `submission_checks` ADD `standard_uncertainty` double;--> statement-breakpoint
ALTER TABLE `submission_checks` ADD `coverage_factor` double;--> statement-breakpoint
ALTER TABLE `submission_checks` ADD `uncertainty_contributions` json;