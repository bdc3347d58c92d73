//! A small, strict reader of `--option value` and `--flag` arguments for the subcommands.
//!
//! Unknown options, missing values and repeated options are bad input: the message names the
//! option so the user can fix the command line.

use std::collections::BTreeMap;

/// Why the command line cannot be read.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum ArgError {
    /// An option the subcommand does not know.
    #[error("unknown option `{0}`")]
    Unknown(String),
    /// An option that needs a value got none.
    #[error("option `{0}` needs a value")]
    MissingValue(String),
    /// The same option given twice.
    #[error("option `{0}` is given twice")]
    Repeated(String),
    /// A value of the wrong form.
    #[error("option `{option}`: {reason}")]
    BadValue {
        /// The option.
        option: String,
        /// What is wrong.
        reason: String,
    },
    /// A positional argument where none is expected.
    #[error("unexpected argument `{0}`")]
    Unexpected(String),
}

/// Parsed arguments: options with values, flags, and positional arguments.
#[derive(Debug, Default)]
pub struct Parsed {
    values: BTreeMap<String, String>,
    flags: Vec<String>,
    /// Arguments that are not options, in order.
    pub positional: Vec<String>,
}

/// Reads `args` given the options that take a value and the flags that do not.
pub fn parse(args: &[String], with_value: &[&str], flags: &[&str]) -> Result<Parsed, ArgError> {
    let mut out = Parsed::default();
    let mut i = 0;
    while i < args.len() {
        let a = &args[i];
        if let Some(stripped) = a.strip_prefix("--") {
            let (name, inline) = match stripped.split_once('=') {
                Some((n, v)) => (format!("--{n}"), Some(v.to_string())),
                None => (a.clone(), None),
            };
            if with_value.contains(&name.as_str()) {
                let value = match inline {
                    Some(v) => v,
                    None => {
                        i += 1;
                        args.get(i)
                            .cloned()
                            .ok_or_else(|| ArgError::MissingValue(name.clone()))?
                    }
                };
                if out.values.insert(name.clone(), value).is_some() {
                    return Err(ArgError::Repeated(name));
                }
            } else if flags.contains(&name.as_str()) && inline.is_none() {
                if out.flags.contains(&name) {
                    return Err(ArgError::Repeated(name));
                }
                out.flags.push(name);
            } else {
                return Err(ArgError::Unknown(name));
            }
        } else {
            out.positional.push(a.clone());
        }
        i += 1;
    }
    Ok(out)
}

impl Parsed {
    /// The value of an option, if given.
    pub fn value(&self, name: &str) -> Option<&str> {
        self.values.get(name).map(String::as_str)
    }

    /// Whether a flag was given.
    pub fn flag(&self, name: &str) -> bool {
        self.flags.iter().any(|f| f == name)
    }

    /// The value of an option read as a whole number.
    pub fn number<T: std::str::FromStr>(&self, name: &str) -> Result<Option<T>, ArgError> {
        self.value(name)
            .map(|v| {
                v.trim().parse::<T>().map_err(|_| ArgError::BadValue {
                    option: name.to_string(),
                    reason: format!("`{v}` is not a whole number"),
                })
            })
            .transpose()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn s(v: &[&str]) -> Vec<String> {
        v.iter().map(|x| x.to_string()).collect()
    }

    #[test]
    fn reads_values_flags_and_positionals() {
        let p = parse(
            &s(&["file.ron", "--runs", "8", "--json", "--seed=3"]),
            &["--runs", "--seed"],
            &["--json"],
        )
        .unwrap();
        assert_eq!(p.value("--runs"), Some("8"));
        assert_eq!(p.number::<u64>("--seed").unwrap(), Some(3));
        assert!(p.flag("--json"));
        assert_eq!(p.positional, ["file.ron"]);
    }

    #[test]
    fn bad_command_lines_name_the_option() {
        let cases: &[(&[&str], ArgError)] = &[
            (&["--bogus"], ArgError::Unknown("--bogus".into())),
            (&["--runs"], ArgError::MissingValue("--runs".into())),
            (
                &["--runs", "8", "--runs", "4"],
                ArgError::Repeated("--runs".into()),
            ),
        ];
        for (args, expected) in cases {
            assert_eq!(&parse(&s(args), &["--runs"], &[]).unwrap_err(), expected);
        }
        let p = parse(&s(&["--runs", "x"]), &["--runs"], &[]).unwrap();
        assert!(p.number::<usize>("--runs").is_err());
    }
}
