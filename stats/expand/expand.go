// Package expand produces digits: the fractional digits of constants in any
// base, computed in binary fixed point with an error bound and verified
// against it (every digit it returns is correct); digit-native sources and
// seeded generators; and exact re-expansion of a digit string into another
// base. It knows nothing of checks.
package expand
