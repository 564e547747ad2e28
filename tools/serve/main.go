// Command serve is a tiny static file server for trying the page from an intranet-like URL:
// it serves one folder on the loopback interface only and prints the URL and the file's path
// (the file works opened directly from disk too).
//
//	serve [-dir dist] [-addr 127.0.0.1:8080]
package main

import (
	"flag"
	"fmt"
	"net"
	"net/http"
	"os"
	"path/filepath"
	"time"
)

func main() {
	dir := flag.String("dir", "dist", "folder to serve")
	addr := flag.String("addr", "127.0.0.1:8080", "loopback address to listen on")
	flag.Parse()
	host, _, err := net.SplitHostPort(*addr)
	if err != nil || !net.ParseIP(host).IsLoopback() {
		fmt.Fprintln(os.Stderr, "serve: listens on a loopback address only (127.0.0.1 or ::1)")
		os.Exit(2)
	}
	ln, err := net.Listen("tcp", *addr)
	if err != nil {
		fmt.Fprintln(os.Stderr, "serve:", err)
		os.Exit(1)
	}
	abs, _ := filepath.Abs(filepath.Join(*dir, "tracewright.html"))
	fmt.Printf("Tracewright at http://%s/tracewright.html\nthe same file on disk: %s\n(Ctrl-C stops)\n", ln.Addr(), abs)
	srv := &http.Server{Handler: http.FileServer(http.Dir(*dir)), ReadHeaderTimeout: 10 * time.Second}
	if err := srv.Serve(ln); err != nil {
		fmt.Fprintln(os.Stderr, "serve:", err)
		os.Exit(1)
	}
}
