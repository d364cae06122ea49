COPY (SELECT * FROM read_csv('{IN}', all_varchar = true)) TO '{OUT}' (HEADER, DELIMITER ',')
