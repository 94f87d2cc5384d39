module lipoplan

go 1.26
