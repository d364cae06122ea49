-- Spark golden: carry_forward
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

-- Step 1 (carry_forward): Fill empty (NULL) values of note with the last value above them among the rows with the same site.
DROP TABLE IF EXISTS `tamis_clean_step_1`;
CREATE TABLE `tamis_clean_step_1` AS
SELECT `site`,
       `district`,
       COALESCE(`note`, MAX(`note`) OVER (PARTITION BY `site`, tamis_run)) AS `note`,
       `tamis_line`
FROM (SELECT *,
             COUNT(`note`) OVER (PARTITION BY `site` ORDER BY `tamis_line`
                               ROWS BETWEEN UNBOUNDED PRECEDING AND CURRENT ROW) AS tamis_run
      FROM `tamis_clean_step_0`) AS runs;

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
