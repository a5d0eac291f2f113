ALTER TABLE `uploads` ADD `storage_key` text NOT NULL;--> statement-breakpoint
CREATE UNIQUE INDEX `uploads_storage_key_unique` ON `uploads` (`storage_key`);--> statement-breakpoint
ALTER TABLE `uploads` DROP COLUMN `content`;