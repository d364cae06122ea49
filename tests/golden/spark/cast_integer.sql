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

-- Step 1 (cast): Rewrite the values of note that convert to integer as SQL CAST does in their plain form, and leave the others as they are.
DROP TABLE IF EXISTS `tamis_clean_step_1`;
CREATE TABLE `tamis_clean_step_1` AS
SELECT `site`,
       `district`,
       COALESCE(CAST(CASE WHEN (TRIM(BOTH ' ' FROM `note`) RLIKE '^(?:[+-]?[0-9]+)\\z')
         THEN CASE WHEN (TRIM(BOTH ' ' FROM `note`) RLIKE '^(?:[+-]?0*[0-9]{0,19}(?:\\.[0-9]*)?)\\z')
              THEN CASE WHEN ROUND(CAST(regexp_extract(TRIM(BOTH ' ' FROM `note`), '^[+-]?[0-9]*(?:\\.[0-9]{0,1})?', 0) AS DECIMAL(20, 1)), 0) BETWEEN -9223372036854775808 AND 9223372036854775807
                        THEN CAST(ROUND(CAST(regexp_extract(TRIM(BOTH ' ' FROM `note`), '^[+-]?[0-9]*(?:\\.[0-9]{0,1})?', 0) AS DECIMAL(20, 1)), 0) AS BIGINT) END END END AS STRING), `note`) AS `note`,
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
