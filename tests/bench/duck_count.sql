SELECT count(*) FROM read_csv('{IN}', all_varchar = true)
