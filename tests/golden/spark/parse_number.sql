-- Spark golden: parse_number
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

-- Step 1 (parse_number): Read note as numbers with 1 decimal (with decimal mark ',' and group mark '.', ignoring ' ', a % sign dividing by 100); values that are not numbers become NULL.
DROP TABLE IF EXISTS `tamis_clean_step_1`;
CREATE TABLE `tamis_clean_step_1` AS
SELECT `site`,
       `district`,
       CASE WHEN length(`note`) - length(replace(`note`, '%', '')) <= 1 AND (replace(replace(`note`, '\u00A0', ''), '%', '') RLIKE '^(?:[+-]?(?:(?:[0-9]{1,3}(?:[\\x{2E}][0-9]{3})+|[0-9]+)(?:[\\x{2C}][0-9]*)?|[\\x{2C}][0-9]+))\\z')
         THEN CASE WHEN instr(`note`, '%') > 0
         THEN CASE WHEN (replace(replace(replace(replace(`note`, '\u00A0', ''), '%', ''), '.', ''), ',', '.') RLIKE '^(?:[+-]?0*[0-9]{0,20}(?:\\.[0-9]*)?)\\z')
              THEN CASE WHEN ROUND((CAST(regexp_extract(replace(replace(replace(replace(`note`, '\u00A0', ''), '%', ''), '.', ''), ',', '.'), '^[+-]?[0-9]*(?:\\.[0-9]{0,4})?', 0) AS DECIMAL(24, 4)) * 0.01), 1) BETWEEN -922337203685477580.8 AND 922337203685477580.7
                        THEN CAST(ROUND((CAST(regexp_extract(replace(replace(replace(replace(`note`, '\u00A0', ''), '%', ''), '.', ''), ',', '.'), '^[+-]?[0-9]*(?:\\.[0-9]{0,4})?', 0) AS DECIMAL(24, 4)) * 0.01), 1) AS DECIMAL(19, 1)) END END
         ELSE CASE WHEN (replace(replace(replace(replace(`note`, '\u00A0', ''), '%', ''), '.', ''), ',', '.') RLIKE '^(?:[+-]?0*[0-9]{0,18}(?:\\.[0-9]*)?)\\z')
              THEN CASE WHEN ROUND(CAST(regexp_extract(replace(replace(replace(replace(`note`, '\u00A0', ''), '%', ''), '.', ''), ',', '.'), '^[+-]?[0-9]*(?:\\.[0-9]{0,2})?', 0) AS DECIMAL(20, 2)), 1) BETWEEN -922337203685477580.8 AND 922337203685477580.7
                        THEN CAST(ROUND(CAST(regexp_extract(replace(replace(replace(replace(`note`, '\u00A0', ''), '%', ''), '.', ''), ',', '.'), '^[+-]?[0-9]*(?:\\.[0-9]{0,2})?', 0) AS DECIMAL(20, 2)), 1) AS DECIMAL(19, 1)) END END END END AS `note`,
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
