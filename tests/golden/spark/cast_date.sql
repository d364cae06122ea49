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

-- Step 1 (cast): Convert note to date as SQL CAST does; values that cannot be converted become NULL.
DROP TABLE IF EXISTS `tamis_clean_step_1`;
CREATE TABLE `tamis_clean_step_1` AS
SELECT `site`,
       `district`,
       CASE
         WHEN CASE WHEN length(TRIM(BOTH ' ' FROM `note`)) = 8 AND (TRIM(BOTH ' ' FROM `note`) RLIKE '^(?:[0-9][0-9][0-9][0-9][\\x{2D}][0-9][\\x{2D}][0-9])\\z') THEN CAST(substr(TRIM(BOTH ' ' FROM `note`), 6, 1) AS INTEGER) BETWEEN 1 AND 12 AND CAST(substr(TRIM(BOTH ' ' FROM `note`), 8, 1) AS INTEGER) BETWEEN 1 AND CASE WHEN CAST(substr(TRIM(BOTH ' ' FROM `note`), 6, 1) AS INTEGER) IN (4, 6, 9, 11) THEN 30 WHEN CAST(substr(TRIM(BOTH ' ' FROM `note`), 6, 1) AS INTEGER) = 2 THEN CASE WHEN (CAST(substr(TRIM(BOTH ' ' FROM `note`), 1, 4) AS INTEGER) % 4 = 0 AND CAST(substr(TRIM(BOTH ' ' FROM `note`), 1, 4) AS INTEGER) % 100 <> 0) OR CAST(substr(TRIM(BOTH ' ' FROM `note`), 1, 4) AS INTEGER) % 400 = 0 THEN 29 ELSE 28 END ELSE 31 END ELSE FALSE END
           THEN CASE WHEN CAST(substr(TRIM(BOTH ' ' FROM `note`), 1, 4) AS INTEGER) = 0 THEN raise_error('year 0000 has no Spark date') ELSE make_date(CAST(substr(TRIM(BOTH ' ' FROM `note`), 1, 4) AS INTEGER), CAST(substr(TRIM(BOTH ' ' FROM `note`), 6, 1) AS INTEGER), CAST(substr(TRIM(BOTH ' ' FROM `note`), 8, 1) AS INTEGER)) END
         WHEN CASE WHEN length(TRIM(BOTH ' ' FROM `note`)) = 9 AND (TRIM(BOTH ' ' FROM `note`) RLIKE '^(?:[0-9][0-9][0-9][0-9][\\x{2D}][0-9][\\x{2D}][0-9][0-9])\\z') THEN CAST(substr(TRIM(BOTH ' ' FROM `note`), 6, 1) AS INTEGER) BETWEEN 1 AND 12 AND CAST(substr(TRIM(BOTH ' ' FROM `note`), 8, 2) AS INTEGER) BETWEEN 1 AND CASE WHEN CAST(substr(TRIM(BOTH ' ' FROM `note`), 6, 1) AS INTEGER) IN (4, 6, 9, 11) THEN 30 WHEN CAST(substr(TRIM(BOTH ' ' FROM `note`), 6, 1) AS INTEGER) = 2 THEN CASE WHEN (CAST(substr(TRIM(BOTH ' ' FROM `note`), 1, 4) AS INTEGER) % 4 = 0 AND CAST(substr(TRIM(BOTH ' ' FROM `note`), 1, 4) AS INTEGER) % 100 <> 0) OR CAST(substr(TRIM(BOTH ' ' FROM `note`), 1, 4) AS INTEGER) % 400 = 0 THEN 29 ELSE 28 END ELSE 31 END ELSE FALSE END
           THEN CASE WHEN CAST(substr(TRIM(BOTH ' ' FROM `note`), 1, 4) AS INTEGER) = 0 THEN raise_error('year 0000 has no Spark date') ELSE make_date(CAST(substr(TRIM(BOTH ' ' FROM `note`), 1, 4) AS INTEGER), CAST(substr(TRIM(BOTH ' ' FROM `note`), 6, 1) AS INTEGER), CAST(substr(TRIM(BOTH ' ' FROM `note`), 8, 2) AS INTEGER)) END
         WHEN CASE WHEN length(TRIM(BOTH ' ' FROM `note`)) = 9 AND (TRIM(BOTH ' ' FROM `note`) RLIKE '^(?:[0-9][0-9][0-9][0-9][\\x{2D}][0-9][0-9][\\x{2D}][0-9])\\z') THEN CAST(substr(TRIM(BOTH ' ' FROM `note`), 6, 2) AS INTEGER) BETWEEN 1 AND 12 AND CAST(substr(TRIM(BOTH ' ' FROM `note`), 9, 1) AS INTEGER) BETWEEN 1 AND CASE WHEN CAST(substr(TRIM(BOTH ' ' FROM `note`), 6, 2) AS INTEGER) IN (4, 6, 9, 11) THEN 30 WHEN CAST(substr(TRIM(BOTH ' ' FROM `note`), 6, 2) AS INTEGER) = 2 THEN CASE WHEN (CAST(substr(TRIM(BOTH ' ' FROM `note`), 1, 4) AS INTEGER) % 4 = 0 AND CAST(substr(TRIM(BOTH ' ' FROM `note`), 1, 4) AS INTEGER) % 100 <> 0) OR CAST(substr(TRIM(BOTH ' ' FROM `note`), 1, 4) AS INTEGER) % 400 = 0 THEN 29 ELSE 28 END ELSE 31 END ELSE FALSE END
           THEN CASE WHEN CAST(substr(TRIM(BOTH ' ' FROM `note`), 1, 4) AS INTEGER) = 0 THEN raise_error('year 0000 has no Spark date') ELSE make_date(CAST(substr(TRIM(BOTH ' ' FROM `note`), 1, 4) AS INTEGER), CAST(substr(TRIM(BOTH ' ' FROM `note`), 6, 2) AS INTEGER), CAST(substr(TRIM(BOTH ' ' FROM `note`), 9, 1) AS INTEGER)) END
         WHEN CASE WHEN length(TRIM(BOTH ' ' FROM `note`)) = 10 AND (TRIM(BOTH ' ' FROM `note`) RLIKE '^(?:[0-9][0-9][0-9][0-9][\\x{2D}][0-9][0-9][\\x{2D}][0-9][0-9])\\z') THEN CAST(substr(TRIM(BOTH ' ' FROM `note`), 6, 2) AS INTEGER) BETWEEN 1 AND 12 AND CAST(substr(TRIM(BOTH ' ' FROM `note`), 9, 2) AS INTEGER) BETWEEN 1 AND CASE WHEN CAST(substr(TRIM(BOTH ' ' FROM `note`), 6, 2) AS INTEGER) IN (4, 6, 9, 11) THEN 30 WHEN CAST(substr(TRIM(BOTH ' ' FROM `note`), 6, 2) AS INTEGER) = 2 THEN CASE WHEN (CAST(substr(TRIM(BOTH ' ' FROM `note`), 1, 4) AS INTEGER) % 4 = 0 AND CAST(substr(TRIM(BOTH ' ' FROM `note`), 1, 4) AS INTEGER) % 100 <> 0) OR CAST(substr(TRIM(BOTH ' ' FROM `note`), 1, 4) AS INTEGER) % 400 = 0 THEN 29 ELSE 28 END ELSE 31 END ELSE FALSE END
           THEN CASE WHEN CAST(substr(TRIM(BOTH ' ' FROM `note`), 1, 4) AS INTEGER) = 0 THEN raise_error('year 0000 has no Spark date') ELSE make_date(CAST(substr(TRIM(BOTH ' ' FROM `note`), 1, 4) AS INTEGER), CAST(substr(TRIM(BOTH ' ' FROM `note`), 6, 2) AS INTEGER), CAST(substr(TRIM(BOTH ' ' FROM `note`), 9, 2) AS INTEGER)) END
         ELSE NULL END AS `note`,
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
