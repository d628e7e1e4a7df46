-- The app user may only append to and read the gate log (grantAppUser). Retention is the one
-- exception, and it goes through these two procedures, which run with their definer's rights and
-- can do nothing but what they say: remove decisions past retention, or blank the badge of a
-- person who was anonymised. A person under an open legal hold is never touched.
CREATE PROCEDURE `retention_purge_gate_checks`(IN p_before DATETIME(3), IN p_max_id BIGINT UNSIGNED)
	MODIFIES SQL DATA
	SQL SECURITY DEFINER
BEGIN
	DELETE FROM `gate_checks`
	WHERE `id` <= p_max_id
		AND `at` < p_before
		AND (`person_id` IS NULL
			OR `person_id` NOT IN (SELECT `person_id` FROM `legal_holds` WHERE `released_at` IS NULL));
	SELECT ROW_COUNT() AS `affected`;
END;
--> statement-breakpoint
CREATE PROCEDURE `retention_anonymise_gate_checks`(IN p_person_id BIGINT UNSIGNED)
	MODIFIES SQL DATA
	SQL SECURITY DEFINER
BEGIN
	UPDATE `gate_checks` SET `badge` = 'anonymised'
	WHERE `person_id` = p_person_id
		AND `badge` <> 'anonymised'
		AND p_person_id NOT IN (SELECT `person_id` FROM `legal_holds` WHERE `released_at` IS NULL);
	SELECT ROW_COUNT() AS `affected`;
END;
