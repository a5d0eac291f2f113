ALTER TABLE `comments` ADD `parent_id` text;--> statement-breakpoint
ALTER TABLE `comments` ADD `resolved_at` integer;--> statement-breakpoint
ALTER TABLE `comments` ADD `resolved_by_id` text REFERENCES user(id);