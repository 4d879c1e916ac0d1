module cvdeck

go 1.26

require (
	github.com/paulmach/orb v0.14.0
	github.com/spf13/cobra v1.10.2
	gonum.org/v1/gonum v0.17.0
	gopkg.in/yaml.v3 v3.0.1
)

require (
	github.com/inconshreveable/mousetrap v1.1.0 // indirect
	github.com/spf13/pflag v1.0.9 // indirect
)
