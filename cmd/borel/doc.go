// Command borel tells whether a digit sequence is statistically consistent
// with a normal sequence (every k-block in base b with frequency b^-k), or
// with a stated digit-frequency vector, and shows the evidence.
//
// Run the built-in scenario, a whole audit in about a second:
//
//	$ borel demo
//
// Audit a file of digits (text in base 2..36, gzip or not; "-" reads
// standard input), against the uniform null:
//
//	$ borel audit testdata/pi-1e6.txt.gz
//
// Against a stated digit-frequency vector, or one estimated from the data:
//
//	$ borel audit testdata/pi-1e6.txt.gz --null 0.1,0.1,0.1,0.1,0.1,0.1,0.1,0.1,0.1,0.1
//	$ borel audit testdata/pi-1e6.txt.gz --null fitted --format json
//
// Raw bytes as base-256 digits or as bits (most significant first):
//
//	$ borel audit - --raw < generator.bin
//	$ borel audit - --bits < generator.bin
//
// Gate a pipeline on the verdict (exit status 3 unless consistent):
//
//	$ borel audit testdata/pi-1e6.txt.gz --strict
//
// Digits of constants in any base, exact re-expansion, and one number
// audited across bases side by side:
//
//	$ borel digits pi --base 7 --count 100
//	$ borel rebase --from 10 --to 3 testdata/pi-1e6.txt.gz -q
//	$ borel audit --source pi --count 20000 --bases 2,3,10,16
//
// Hexadecimal digits of π far out, by digit extraction (in constant
// memory, each digit certified):
//
//	$ borel digits pi --base 16 --offset 999999 --count 14
//
// Check a file of digits against a source at random spots (or every digit
// with --all) before auditing it:
//
//	$ borel verify testdata/pi-1e6.txt.gz --source pi --spots 8
//
// The Hausdorff dimension of the numbers with given digit frequencies
// (Besicovitch–Eggleston), the multifractal spectrum of the product
// measure, and a restricted-digit set:
//
//	$ borel dimension 0.5,0,0.5
//	$ borel dimension 0.5,0.3,0.2 --alpha 0.9
//	$ borel dimension --only 0,2 --base 3
//
// Exit status: 0 success; 1 the input could not be read or is not a sequence
// of the base; 2 invalid options or arguments, found before any work; 3 with
// --strict, a verdict other than consistent (verify: a digit that differs). Every error is one line on
// standard error starting with "borel:".
package main
