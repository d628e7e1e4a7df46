-- A submitted attempt is immutable: grading happens once, inside the transaction that moves the
-- attempt out of 'open', and after that neither the attempt nor its items may change or vanish.
CREATE TRIGGER `check_attempts_immutable` BEFORE UPDATE ON `check_attempts` FOR EACH ROW
BEGIN
	IF OLD.`state` <> 'open' THEN
		SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'check_attempts: a submitted attempt is immutable';
	END IF;
END;
--> statement-breakpoint
CREATE TRIGGER `check_attempts_no_delete` BEFORE DELETE ON `check_attempts` FOR EACH ROW
BEGIN
	SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'check_attempts: attempts are never deleted';
END;
--> statement-breakpoint
CREATE TRIGGER `attempt_items_immutable` BEFORE UPDATE ON `attempt_items` FOR EACH ROW
BEGIN
	IF (SELECT `state` FROM `check_attempts` WHERE `id` = OLD.`attempt_id`) <> 'open' THEN
		SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'attempt_items: a submitted attempt is immutable';
	END IF;
END;
--> statement-breakpoint
CREATE TRIGGER `attempt_items_no_delete` BEFORE DELETE ON `attempt_items` FOR EACH ROW
BEGIN
	SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'attempt_items: attempt items are never deleted';
END;
