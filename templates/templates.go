// Package templates holds the page templates, the style sheets and the
// chart library that render inlines into every page. Only render reads it.
package templates

import "embed"

// FS holds every file of this folder that render uses.
//
//go:embed *.tmpl
var FS embed.FS
