module github.com/rampwise/rampwise

go 1.26.8

require (
	github.com/google/renameio/v2 v2.0.2
	github.com/pelletier/go-toml/v2 v2.4.3
	gonum.org/v1/gonum v0.17.0
)

require golang.org/x/tools v0.30.0 // indirect
