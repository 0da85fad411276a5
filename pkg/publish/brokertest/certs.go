package brokertest

import (
	"crypto/ecdsa"
	"crypto/elliptic"
	"crypto/rand"
	"crypto/x509"
	"crypto/x509/pkix"
	"encoding/pem"
	"math/big"
	"net"
	"os"
	"path/filepath"
	"time"
)

// certSet names the PEM files writeCerts leaves in a folder.
type certSet struct {
	ca, serverCert, serverKey, clientCert, clientKey string
}

// writeCerts makes a throw-away certificate authority valid for one day, a
// server certificate for IP 127.0.0.1 and DNS name "localhost", and a client
// certificate with common name "test-client", all ECDSA P-256 and signed by
// that authority, and writes them as PEM files (mode 0600) into dir.
func writeCerts(dir string) (certSet, error) {
	files := certSet{
		ca:         filepath.Join(dir, "ca.pem"),
		serverCert: filepath.Join(dir, "server.pem"),
		serverKey:  filepath.Join(dir, "server-key.pem"),
		clientCert: filepath.Join(dir, "client.pem"),
		clientKey:  filepath.Join(dir, "client-key.pem"),
	}
	start := time.Now().Add(-5 * time.Minute)
	end := start.Add(24 * time.Hour)

	caKey, err := ecdsa.GenerateKey(elliptic.P256(), rand.Reader)
	if err != nil {
		return files, err
	}
	caTmpl := &x509.Certificate{
		Subject:               pkix.Name{CommonName: "brokertest CA"},
		NotBefore:             start,
		NotAfter:              end,
		IsCA:                  true,
		BasicConstraintsValid: true,
		KeyUsage:              x509.KeyUsageCertSign | x509.KeyUsageCRLSign,
	}
	caDER, caCert, err := sign(caTmpl, caTmpl, &caKey.PublicKey, caKey)
	if err != nil {
		return files, err
	}
	if err := writePEM(files.ca, "CERTIFICATE", caDER); err != nil {
		return files, err
	}

	leaves := []struct {
		tmpl      *x509.Certificate
		cert, key string
	}{
		{&x509.Certificate{
			Subject:     pkix.Name{CommonName: "localhost"},
			IPAddresses: []net.IP{net.IPv4(127, 0, 0, 1)},
			DNSNames:    []string{"localhost"},
			ExtKeyUsage: []x509.ExtKeyUsage{x509.ExtKeyUsageServerAuth},
		}, files.serverCert, files.serverKey},
		{&x509.Certificate{
			Subject:     pkix.Name{CommonName: "test-client"},
			ExtKeyUsage: []x509.ExtKeyUsage{x509.ExtKeyUsageClientAuth},
		}, files.clientCert, files.clientKey},
	}
	for _, l := range leaves {
		key, err := ecdsa.GenerateKey(elliptic.P256(), rand.Reader)
		if err != nil {
			return files, err
		}
		l.tmpl.NotBefore, l.tmpl.NotAfter = start, end
		l.tmpl.KeyUsage = x509.KeyUsageDigitalSignature
		der, _, err := sign(l.tmpl, caCert, &key.PublicKey, caKey)
		if err != nil {
			return files, err
		}
		keyDER, err := x509.MarshalPKCS8PrivateKey(key)
		if err != nil {
			return files, err
		}
		if err := writePEM(l.cert, "CERTIFICATE", der); err != nil {
			return files, err
		}
		if err := writePEM(l.key, "PRIVATE KEY", keyDER); err != nil {
			return files, err
		}
	}
	return files, nil
}

// sign gives tmpl a random serial number and signs it with parent's key.
func sign(tmpl, parent *x509.Certificate, pub *ecdsa.PublicKey, priv *ecdsa.PrivateKey) ([]byte, *x509.Certificate, error) {
	serial, err := rand.Int(rand.Reader, new(big.Int).Lsh(big.NewInt(1), 127))
	if err != nil {
		return nil, nil, err
	}
	tmpl.SerialNumber = serial
	der, err := x509.CreateCertificate(rand.Reader, tmpl, parent, pub, priv)
	if err != nil {
		return nil, nil, err
	}
	cert, err := x509.ParseCertificate(der)
	return der, cert, err
}

// writePEM writes one PEM block of the given type to path.
func writePEM(path, kind string, der []byte) error {
	return os.WriteFile(path, pem.EncodeToMemory(&pem.Block{Type: kind, Bytes: der}), 0o600)
}
