// Package entry turns what a crew typed (a command's flags, a pit page's
// form fields, a logger's lines) into a checked weather reading, a logged
// pass from its slip, or a gathered round's card input, alike for every
// front end. It does not own the event folder's files, settings, locks or
// safe writes (event), nor bring in files from elsewhere (bringin): it
// reads and writes the folder through event.
package entry
