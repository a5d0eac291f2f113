CREATE TABLE `matrix_results` (
	`id` text PRIMARY KEY NOT NULL,
	`revision_id` text NOT NULL,
	`result` text NOT NULL,
	`elapsed_ms` integer NOT NULL,
	`created_by` text,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`revision_id`) REFERENCES `sheet_revisions`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`created_by`) REFERENCES `user`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE UNIQUE INDEX `matrix_results_revision_idx` ON `matrix_results` (`revision_id`);