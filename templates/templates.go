// Package templates holds the page templates, the style sheet, the pages'
// own script and the chart library that render inlines into every page.
// Only render reads it.
package templates

import "embed"

// FS holds every file of this folder that render uses. The chart library's
// licence files sit beside it in vendor/ but are not embedded.
//
//go:embed *.tmpl page.css page.js vendor/echarts.custom.min.js
var FS embed.FS
