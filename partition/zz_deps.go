package partition

import (
	_ "github.com/BurntSushi/toml"
	_ "github.com/parquet-go/parquet-go"
	_ "github.com/paulmach/orb"
	_ "github.com/paulmach/osm"
	_ "github.com/paulmach/osm/osmpbf"
	_ "github.com/paulmach/osm/osmxml"
	_ "github.com/schollz/progressbar/v3"
	_ "github.com/tidwall/rtree"
	_ "github.com/xuri/excelize/v2"
	_ "golang.org/x/term"
	_ "gonum.org/v1/gonum/graph"
	_ "gonum.org/v1/gonum/stat"
)
