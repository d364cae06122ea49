-- Spark golden: require
-- Written by `tamis sql --dialect spark`. The raw table tamis_raw is only read; the cleaned table is tamis_clean.
-- Row order: ORDER BY tamis_line (the record's position in the file, carried through every step).

-- Staging copy of the raw table.
DROP TABLE IF EXISTS `tamis_clean_step_0`;
CREATE TABLE `tamis_clean_step_0` AS
SELECT `site`,
       `district`,
       `note`,
       `tamis_line`
FROM `tamis_raw`;

-- Step 1 (require): Require each combination of site and note to be unique; stop the run if a row fails.
SELECT CASE WHEN (SELECT COUNT(*) FROM (SELECT COUNT(*) AS copies FROM `tamis_clean_step_0` WHERE `site` IS NOT NULL AND `note` IS NOT NULL GROUP BY `site`, `note` HAVING COUNT(*) > 1) AS repeated) > 0 THEN raise_error('step 1 (require unique) failed') END AS tamis_require;

-- The cleaned table.
DROP TABLE IF EXISTS `tamis_clean`;
CREATE TABLE `tamis_clean` AS
SELECT `site`,
       `district`,
       `note`,
       `tamis_line`
FROM `tamis_clean_step_0`;
DROP TABLE `tamis_clean_step_0`;
