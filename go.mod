module headroom

go 1.26.8

require (
	github.com/BurntSushi/toml v1.6.0
	github.com/fatih/color v1.19.0
	github.com/santhosh-tekuri/jsonschema/v6 v6.0.3
	golang.org/x/tools v0.52.0
	gonum.org/v1/gonum v0.17.0
)

require (
	github.com/mattn/go-colorable v0.1.14 // indirect
	github.com/mattn/go-isatty v0.0.20 // indirect
	golang.org/x/sys v0.49.0 // indirect
	golang.org/x/text v0.23.0 // indirect
)
