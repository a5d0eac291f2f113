-- Revisions are signed as checked or returned for correction; earlier signatures keep their meaning under the new words.
UPDATE `sheet_revisions` SET `review_state` = 'checked' WHERE `review_state` = 'approved';--> statement-breakpoint
UPDATE `sheet_revisions` SET `review_state` = 'returned' WHERE `review_state` = 'changes-requested';--> statement-breakpoint
UPDATE `reviews` SET `verdict` = 'checked' WHERE `verdict` = 'approved';--> statement-breakpoint
UPDATE `reviews` SET `verdict` = 'returned' WHERE `verdict` = 'changes-requested';--> statement-breakpoint
UPDATE `audit_events` SET `action` = 'sheet.check' WHERE `action` = 'sheet.approve';--> statement-breakpoint
UPDATE `audit_events` SET `action` = 'sheet.return' WHERE `action` = 'sheet.request_changes';
