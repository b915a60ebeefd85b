package serve

import (
	"encoding/json"
	"reflect"
	"sort"
	"strings"
	"testing"
)

// TestOpenAPI checks the OpenAPI 3 document against the handlers: every
// documented operation is served and every served one documented, and
// the request schemas list exactly the fields the handlers decode.
func TestOpenAPI(t *testing.T) {
	s := testServer(t, nil)
	a := call(t, s.Handler(), "GET", "/v1/openapi.json", nil)
	if a.code != 200 {
		t.Fatalf("openapi.json: %d", a.code)
	}
	if v, _ := a.doc["openapi"].(string); !strings.HasPrefix(v, "3.") {
		t.Fatalf("openapi %q, want 3.x", v)
	}
	var documented []string
	for path, item := range a.doc["paths"].(map[string]any) {
		for method, op := range item.(map[string]any) {
			documented = append(documented, strings.ToUpper(method)+" "+path)
			if _, ok := op.(map[string]any)["responses"].(map[string]any)["200"]; !ok {
				t.Errorf("%s %s: no 200 response", method, path)
			}
		}
	}
	var served []string
	for _, p := range s.Patterns {
		served = append(served, strings.Replace(p, "{$}", "", 1))
	}
	sort.Strings(documented)
	sort.Strings(served)
	if !reflect.DeepEqual(documented, served) {
		t.Errorf("documented %v\nserved     %v", documented, served)
	}
	// Every served pattern answers something other than the catch-all 404.
	for _, p := range served {
		method, path, _ := strings.Cut(p, " ")
		path = strings.NewReplacer("{file}", "app.js", "{id}", "1").Replace(path)
		var body any
		if method == "POST" {
			body = map[string]any{}
		}
		r := call(t, s.Handler(), method, path, body)
		if e, _ := r.doc["error"].(string); strings.HasPrefix(e, "no such endpoint") {
			t.Errorf("%s: not served", p)
		}
	}
	schemas := a.doc["components"].(map[string]any)["schemas"].(map[string]any)
	for name, typ := range map[string]reflect.Type{"PlanRequest": reflect.TypeFor[planBody](), "AssessRequest": reflect.TypeFor[planRequest](), "EnvelopeRequest": reflect.TypeFor[envelopeRequest](), "Record": reflect.TypeFor[Record]()} {
		props := schemas[name].(map[string]any)["properties"].(map[string]any)
		var doc, code []string
		for k := range props {
			doc = append(doc, k)
		}
		code = jsonFields(typ)
		if name == "PlanRequest" {
			code = remove(code, "profile")
		}
		sort.Strings(doc)
		sort.Strings(code)
		if !reflect.DeepEqual(doc, code) {
			t.Errorf("%s: documented %v\ndecoded %v", name, doc, code)
		}
	}
	// The endpoints that compute in a slot document 429 and 503 with
	// Retry-After (compute's errQueueFull, errBusy and timeoutErr).
	busy := a.doc["components"].(map[string]any)["responses"].(map[string]any)["Busy"].(map[string]any)
	if _, ok := busy["headers"].(map[string]any)["Retry-After"]; !ok {
		t.Errorf("the Busy response documents no Retry-After header")
	}
	for _, op := range []string{"POST /v1/plan", "POST /v1/assess", "POST /v1/envelope", "GET /v1/weather"} {
		method, path, _ := strings.Cut(op, " ")
		resp := a.doc["paths"].(map[string]any)[path].(map[string]any)[strings.ToLower(method)].(map[string]any)["responses"].(map[string]any)
		for _, code := range []string{"429", "503"} {
			if r, _ := resp[code].(map[string]any); r["$ref"] != "#/components/responses/Busy" {
				t.Errorf("%s: %s is not the Busy response: %v", op, code, resp[code])
			}
		}
	}
	var check map[string]any
	if err := json.Unmarshal(openapiDoc, &check); err != nil {
		t.Fatal(err)
	}
}

func jsonFields(t reflect.Type) []string {
	var out []string
	for f := range t.Fields() {
		f := f
		if f.Anonymous {
			out = append(out, jsonFields(f.Type)...)
			continue
		}
		name, _, _ := strings.Cut(f.Tag.Get("json"), ",")
		out = append(out, name)
	}
	return out
}

func remove(s []string, x string) []string {
	var out []string
	for _, v := range s {
		if v != x {
			out = append(out, v)
		}
	}
	return out
}
