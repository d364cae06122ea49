-- Spark golden: split_column
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

-- Step 1 (split_column): Split site at " " into the new columns a, b and c (the last one takes the rest; missing parts are NULL).
DROP TABLE IF EXISTS `tamis_clean_step_1`;
CREATE TABLE `tamis_clean_step_1` AS
SELECT `site`,
       CASE WHEN instr(`site`, ' ') > 0 THEN substr(`site`, 1, instr(`site`, ' ') - 1) ELSE `site` END AS `a`,
       CASE WHEN instr(CASE WHEN instr(`site`, ' ') > 0 THEN substr(`site`, instr(`site`, ' ') + 1) END, ' ') > 0 THEN substr(CASE WHEN instr(`site`, ' ') > 0 THEN substr(`site`, instr(`site`, ' ') + 1) END, 1, instr(CASE WHEN instr(`site`, ' ') > 0 THEN substr(`site`, instr(`site`, ' ') + 1) END, ' ') - 1) ELSE CASE WHEN instr(`site`, ' ') > 0 THEN substr(`site`, instr(`site`, ' ') + 1) END END AS `b`,
       CASE WHEN instr(CASE WHEN instr(`site`, ' ') > 0 THEN substr(`site`, instr(`site`, ' ') + 1) END, ' ') > 0 THEN substr(CASE WHEN instr(`site`, ' ') > 0 THEN substr(`site`, instr(`site`, ' ') + 1) END, instr(CASE WHEN instr(`site`, ' ') > 0 THEN substr(`site`, instr(`site`, ' ') + 1) END, ' ') + 1) END AS `c`,
       `district`,
       `note`,
       `tamis_line`
FROM `tamis_clean_step_0`;

-- The cleaned table.
DROP TABLE IF EXISTS `tamis_clean`;
CREATE TABLE `tamis_clean` AS
SELECT `site`,
       `a`,
       `b`,
       `c`,
       `district`,
       `note`,
       `tamis_line`
FROM `tamis_clean_step_1`;
DROP TABLE `tamis_clean_step_0`;
DROP TABLE `tamis_clean_step_1`;
