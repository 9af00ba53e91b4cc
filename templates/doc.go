// Package templates renders the starting text of new notebook entries.
//
// There is one template per entry kind (wafer, piece, mask, process, device,
// cooldown) and one for the README that a new notebook starts with
// ("notebook-readme"). The defaults are embedded in the binary; a notebook can
// replace any of them with a file of the same name in its own templates/
// folder, passed to [Render] as an [io/fs.FS].
//
// Templates use [text/template] with [Data] as the dot. Besides the fields of
// Data they may call these functions:
//
//   - yq STRING: the string as a YAML scalar, quoted only where a plain scalar
//     would read as something else (a number, a boolean, null, a date).
//   - date STRING: a YYYY-MM-DD date as a plain YAML scalar; nothing (YAML
//     null) when empty.
//
// and the method .Parent (the first id given with --from, or "").
//
// Every rendered kind template is a valid entry: the front matter holds id and
// kind, the parents are filled into the link fields of that kind (piece and
// device: from; process: pieces; cooldown: devices). A link with no parent
// given is left empty (a YAML null, which the notebook reads as "not filled
// in"; an empty string would read as a link to the id ""). Every quantity field
// holds an example value with a unit, marked "# edit", never a bare number.
// Calc blocks in the templates hold comment lines only, so a fresh entry
// evaluates without error before the user fills it in.
//
// The package checks what it renders: front matter that is not valid YAML, or
// whose id or kind differ from the Data, is an error naming the template.
// It does not know the notebook's schema beyond that; the notebook package
// validates entries.
//
// The safety wording in the process and cooldown templates is a reminder. It
// is not a procedure and the package is not a safety authority: the templates
// say so and defer to local rules, SOPs and SDSs.
package templates
