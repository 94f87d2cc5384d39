// Package catalogue holds the fatty-acid reference table, the stock catalogue
// and product specifications, their strict TOML loading and validation, and
// the embedded demo data of an invented plant.
package catalogue
