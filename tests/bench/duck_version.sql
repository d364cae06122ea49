SELECT version()
