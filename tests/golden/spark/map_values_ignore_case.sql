-- Spark golden: map_values
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

-- Step 1 (map_values): In district, replace 2 listed values with their preferred spelling, ignoring case.
DROP TABLE IF EXISTS `tamis_clean_step_1`;
CREATE TABLE `tamis_clean_step_1` AS
SELECT `site`,
       CASE replace(replace(replace(replace(replace(translate(`district`, 'AEFMNORSTſ', 'aefmnorsts'), 'ß', 'ss'), 'ẞ', 'ss'), 'ﬀ', 'ff'), 'ﬅ', 'st'), 'ﬆ', 'st')
         WHEN 'strasse' THEN 'Street'
         WHEN 'fenmore' THEN 'Fenmoor'
         ELSE `district` END AS `district`,
       `note`,
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
