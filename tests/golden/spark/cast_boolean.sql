-- Spark golden: cast
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

-- Step 1 (cast): Convert note to boolean as SQL CAST does; reject the rows whose value cannot be converted.
SELECT CASE WHEN (SELECT COUNT(*) FROM `tamis_clean_step_0` WHERE `note` IS NOT NULL AND NOT ((TRIM(BOTH ' ' FROM `note`) RLIKE '^(?:[Tt][Rr][Uu][Ee])\\z') OR (TRIM(BOTH ' ' FROM `note`) RLIKE '^(?:[Ff][Aa][Ll][Ss][Ee])\\z') OR (TRIM(BOTH ' ' FROM `note`) RLIKE '^(?:[Uu][Nn][Kk][Nn][Oo][Ww][Nn])\\z'))) > 0 THEN raise_error('step 1 (cast) rejected rows, and input.max_rejects allows none') END AS tamis_check;
DROP TABLE IF EXISTS `tamis_clean_step_1`;
CREATE TABLE `tamis_clean_step_1` AS
SELECT `site`,
       `district`,
       CASE WHEN (TRIM(BOTH ' ' FROM `note`) RLIKE '^(?:[Tt][Rr][Uu][Ee])\\z') THEN TRUE WHEN (TRIM(BOTH ' ' FROM `note`) RLIKE '^(?:[Ff][Aa][Ll][Ss][Ee])\\z') THEN FALSE END AS `note`,
       `tamis_line`
FROM `tamis_clean_step_0`;

-- The cleaned table.
DROP TABLE IF EXISTS `tamis_clean`;
CREATE TABLE `tamis_clean` AS
SELECT `site`,
       `district`,
       `note`,
       `tamis_line`
FROM `tamis_clean_step_1`;
DROP TABLE `tamis_clean_step_0`;
DROP TABLE `tamis_clean_step_1`;
