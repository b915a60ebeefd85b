package serve

import (
	"bytes"
	"context"
	"crypto/ecdsa"
	"crypto/elliptic"
	"crypto/rand"
	"crypto/tls"
	"crypto/x509"
	"crypto/x509/pkix"
	"encoding/json"
	"encoding/pem"
	"math/big"
	"net"
	"net/http"
	"os"
	"path/filepath"
	"testing"
	"time"
)

// TestDrain: cancelling Serve's context (what SIGTERM does in the
// command) lets a plan in flight finish with 200 and its record, then
// Serve returns.
func TestDrain(t *testing.T) {
	s := testServer(t, nil)
	ln, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithCancel(t.Context())
	done := make(chan error, 1)
	go func() { done <- s.Serve(ctx, ln, "", "", time.Minute) }()
	body, _ := json.Marshal(longFlight())
	res := make(chan int, 1)
	go func() {
		r, err := http.Post("http://"+ln.Addr().String()+"/v1/plan", "application/json", bytes.NewReader(body))
		if err != nil {
			res <- -1
			return
		}
		r.Body.Close()
		res <- r.StatusCode
	}()
	for i := 0; i < 200 && len(s.slots) == 0; i++ { // until the plan is computing
		time.Sleep(10 * time.Millisecond)
	}
	cancel()
	if code := <-res; code != 200 {
		t.Errorf("plan in flight during the drain: %d", code)
	}
	if err := <-done; err != nil {
		t.Errorf("Serve: %v", err)
	}
	if n := records(t, s); n != 1 {
		t.Errorf("%d records", n)
	}
	if _, err := net.DialTimeout("tcp", ln.Addr().String(), time.Second); err == nil {
		t.Errorf("still accepting connections after the drain")
	}
}

// TestTLS serves HTTPS with a self-signed certificate made here.
func TestTLS(t *testing.T) {
	dir := t.TempDir()
	key, err := ecdsa.GenerateKey(elliptic.P256(), rand.Reader)
	if err != nil {
		t.Fatal(err)
	}
	tmpl := &x509.Certificate{SerialNumber: big.NewInt(1), Subject: pkix.Name{CommonName: "127.0.0.1"}, NotBefore: time.Now().Add(-time.Hour),
		NotAfter: time.Now().Add(time.Hour), IPAddresses: []net.IP{net.ParseIP("127.0.0.1")}, KeyUsage: x509.KeyUsageDigitalSignature,
		ExtKeyUsage: []x509.ExtKeyUsage{x509.ExtKeyUsageServerAuth}}
	der, err := x509.CreateCertificate(rand.Reader, tmpl, tmpl, &key.PublicKey, key)
	if err != nil {
		t.Fatal(err)
	}
	kb, _ := x509.MarshalECPrivateKey(key)
	certFile, keyFile := filepath.Join(dir, "cert.pem"), filepath.Join(dir, "key.pem")
	os.WriteFile(certFile, pem.EncodeToMemory(&pem.Block{Type: "CERTIFICATE", Bytes: der}), 0o600)
	os.WriteFile(keyFile, pem.EncodeToMemory(&pem.Block{Type: "EC PRIVATE KEY", Bytes: kb}), 0o600)
	s := testServer(t, nil)
	ln, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithCancel(t.Context())
	done := make(chan error, 1)
	go func() { done <- s.Serve(ctx, ln, certFile, keyFile, time.Second) }()
	cert, _ := x509.ParseCertificate(der)
	pool := x509.NewCertPool()
	pool.AddCert(cert)
	cl := &http.Client{Transport: &http.Transport{TLSClientConfig: &tls.Config{RootCAs: pool}}, Timeout: 10 * time.Second}
	r, err := cl.Get("https://" + ln.Addr().String() + "/healthz")
	if err != nil {
		t.Fatalf("HTTPS: %v", err)
	}
	r.Body.Close()
	if r.StatusCode != 200 || r.TLS == nil {
		t.Errorf("HTTPS healthz: %d", r.StatusCode)
	}
	cancel()
	if err := <-done; err != nil {
		t.Errorf("Serve: %v", err)
	}
}
