#!/bin/sh
# The GIS demonstration (basins/quillerby, invented): the basin file built from its GeoJSON
# layers by `freshet layers`, checked, edited and re-read, routed, and its NetCDF stations
# placed where the layers put them (read with netCDF4-python). Then a layer with a dangling
# reach end: exit 2, the message names the layer, the feature and the property, and no
# basin file is left.
# usage: layers_demo_test.sh FRESHET SOURCE_DIR SCRATCH_DIR
set -eu
freshet=$1; src=$2; scratch=$3
rm -rf "$scratch"; mkdir -p "$scratch"
cp -r "$src/../../basins/quillerby" "$scratch/q"
cd "$scratch/q"
"$freshet" layers settings.toml --subcatchments subcatchments.geojson --reaches reaches.geojson \
  --points points.geojson --out quillerby.toml > layers.log
grep -q "^quillerby.toml: 4 subcatchment(s), 4 reach(es), 3 point element(s)" layers.log
"$freshet" check quillerby.toml > check.log
# The written study can be edited: a wider culvert barrel, then checked again.
sed 's/diameter = 1.5/diameter = 1.8/' quillerby.toml > edited.toml
"$freshet" check edited.toml > /dev/null
"$freshet" route quillerby.toml --storm sep-2026 --out out --quiet > route.log
/usr/bin/python3 - out/base <<'PY'
import json, sys
import netCDF4
folder = sys.argv[1]
layers = {}
for name in ("subcatchments", "reaches", "points"):
    for f in json.load(open(f"{name}.geojson"))["features"]:
        g = f["geometry"]
        if g["type"] == "Point":
            layers[f["id"]] = g["coordinates"]
        elif g["type"] == "LineString":
            layers[f["id"]] = g["coordinates"][-1]       # a reach at its downstream end
        else:
            ring = g["coordinates"][0][:-1]              # the mean of the ring's vertices
            layers[f["id"]] = [sum(p[0] for p in ring) / len(ring), sum(p[1] for p in ring) / len(ring)]
placed = 0
for path, kind in ((f"{folder}/sep-2026.nc", "station"), (f"{folder}/sep-2026_subcatchments.nc", "subcatchment")):
    with netCDF4.Dataset(path) as ds:
        assert ds["lon"].standard_name == "longitude" and ds["lat"].units == "degrees_north"
        assert ds[ds["discharge"].grid_mapping].grid_mapping_name == "latitude_longitude"
        for k, sid in enumerate(str(x) for x in ds[f"{kind}_id"][:]):
            lon, lat = float(ds["lon"][k]), float(ds["lat"][k])
            want = layers[sid]
            assert abs(lon - want[0]) < 1e-9 and abs(lat - want[1]) < 1e-9, (sid, lon, lat, want)
            placed += 1
        assert float(ds["discharge"][:].max()) > 0.0
assert placed == len(layers), (placed, len(layers))
print(f"layers demo: {placed} elements placed where the layers put them")
PY

# A reach whose downstream end meets nothing: exit 2, located, nothing written.
sed 's/\[-30.486, 45.2015\], \[-30.480, 45.200\]/[-30.486, 45.2015], [-30.4805, 45.2005]/' \
  reaches.geojson > dangling.geojson
grep -q -- "-30.4805, 45.2005" dangling.geojson
set +e
"$freshet" layers settings.toml --subcatchments subcatchments.geojson --reaches dangling.geojson \
  --points points.geojson --out broken.toml > bad.log 2>&1
code=$?
set -e
cat bad.log
test "$code" -eq 2
grep -q "^dangling.geojson: features\[3\] (id 'lower-beck'), field 'properties.to' is not given and its downstream end (-30.4805, 45.2005) is a dangling end" bad.log
test ! -e broken.toml
test -z "$(ls -A . | grep -v -e '^out$' -e '\.geojson$' -e '\.toml$' -e '\.csv$' -e '\.log$')"
echo "layers demo: a dangling end is refused, nothing written"
