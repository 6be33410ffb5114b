module early.invalid/termquiet

go 1.26.0
