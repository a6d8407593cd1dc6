// Package demo writes a synthetic measurement archive from a physical model
// of an invented product measured in an invented range: the archive behind
// `gtpack demo` and the committed sample-archive.
//
// Every number comes from the model in Truth (passive gain, receiver noise
// temperature and gain, scan loss, range loss, reference horn) plus white
// measurement noise from generators seeded by Options.Seed, so the same
// options give byte-identical files and a test can compare what the tool
// reduces with what was planted. The files are written with the project's
// own Touchstone and trace writers. The package never reads an archive and
// knows nothing of the reduction beyond the physics of method.md.
package demo
