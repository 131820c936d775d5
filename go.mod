module chargeward

go 1.26.8

require (
	github.com/go-pdf/fpdf v0.9.0
	github.com/santhosh-tekuri/jsonschema/v5 v5.3.1
	golang.org/x/image v0.30.0
	gonum.org/v1/gonum v0.17.0
	gopkg.in/yaml.v3 v3.0.1
)

require github.com/expr-lang/expr v1.17.8
