-- A sheet's review status described its latest revision; it moves onto that revision before the sheet's column goes.
UPDATE `sheet_revisions` SET `review_state` = (
  SELECT `sheets`.`status` FROM `sheets` WHERE `sheets`.`id` = `sheet_revisions`.`sheet_id`
)
WHERE EXISTS (
  SELECT 1 FROM `sheets`
  WHERE `sheets`.`id` = `sheet_revisions`.`sheet_id`
    AND `sheets`.`latest_revision` = `sheet_revisions`.`number`
    AND `sheets`.`status` IN ('approved', 'changes-requested')
);
