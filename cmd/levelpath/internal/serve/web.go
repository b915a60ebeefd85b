package serve

import (
	"embed"
	"mime"
	"net/http"
	"path"
)

// web holds the page and its script and style sheet; the page loads
// nothing from the network.
//
//go:embed web/index.html web/app.js web/style.css
var web embed.FS

//go:embed openapi.json
var openapiDoc []byte

func (s *Server) page(w http.ResponseWriter, r *http.Request) error {
	return serveFile(w, "web/index.html")
}

func (s *Server) static(w http.ResponseWriter, r *http.Request) error {
	name := r.PathValue("file")
	if name != "app.js" && name != "style.css" {
		return &apiError{Status: http.StatusNotFound, Msg: "no such file: " + name}
	}
	return serveFile(w, "web/"+name)
}

func serveFile(w http.ResponseWriter, name string) error {
	b, err := web.ReadFile(name)
	if err != nil {
		return err
	}
	ct := mime.TypeByExtension(path.Ext(name))
	if ct == "" {
		ct = "application/octet-stream"
	}
	h := w.Header()
	h.Set("Content-Type", ct)
	h.Set("X-Content-Type-Options", "nosniff")
	h.Set("Content-Security-Policy", "default-src 'self'; img-src 'self' data:; style-src 'self' 'unsafe-inline'")
	h.Set("Cache-Control", "no-cache")
	w.Write(b)
	return nil
}

func (s *Server) openapi(w http.ResponseWriter, r *http.Request) error {
	w.Header().Set("Content-Type", "application/json")
	w.Write(openapiDoc)
	return nil
}
