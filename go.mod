module github.com/chipband/chipband

go 1.26

require (
	github.com/peterstace/simplefeatures v0.50.0 // indirect
	github.com/stretchr/testify v1.12.1 // indirect
	github.com/twpayne/go-geos v0.19.0 // indirect
	go.yaml.in/yaml/v3 v3.0.5 // indirect
)
