module github.com/lathmark-team/lathmark

go 1.26.0

require (
	github.com/gorilla/websocket v1.5.3
	github.com/robfig/cron/v3 v3.0.1
	github.com/slack-go/slack v0.35.0
	go.etcd.io/bbolt v1.5.0
	golang.org/x/net v0.63.0
	gonum.org/v1/gonum v0.17.0
	gonum.org/v1/plot v0.17.0
)

require github.com/mtibben/confusables v0.0.0-20210201002637-9d1b0723b659

require (
	codeberg.org/go-fonts/liberation v0.5.0 // indirect
	codeberg.org/go-latex/latex v0.2.0 // indirect
	codeberg.org/go-pdf/fpdf v0.11.1 // indirect
	git.sr.ht/~sbinet/gg v0.7.0 // indirect
	github.com/ajstarks/svgo v0.0.0-20211024235047-1546f124cd8b // indirect
	github.com/golang/freetype v0.0.0-20170609003504-e2365dfdc4a0 // indirect
	golang.org/x/image v0.30.0 // indirect
	golang.org/x/sys v0.50.0 // indirect
	golang.org/x/text v0.44.0
)
