//! Finding where in the file a key or an equipment item was written, so that errors
//! found after parsing still point at a line and column.

/// A key written in the file: its name, line and column.
type KeyPlace = (String, usize, usize);

/// A (line, column) in the file, both 1-based.
pub type Position = (usize, usize);

/// Positions of the equipment items and their keys in the file's text.
#[derive(Debug, Clone, Default)]
pub struct Locator {
    /// Per equipment item (in file order): its first line and the place of each key
    /// written on its own line.
    items: Vec<(usize, Vec<KeyPlace>)>,
    /// Top-level keys and their lines.
    top: Vec<(String, usize)>,
}

fn key_of(text: &str) -> Option<&str> {
    let trimmed = text.trim_start();
    let (key, rest) = trimmed.split_once(':')?;
    if key.is_empty() || key.contains(' ') || key.starts_with('#') || key.starts_with('{') {
        return None;
    }
    (rest.is_empty() || rest.starts_with(' ')).then_some(key)
}

impl Locator {
    /// Scans the text of a flowsheet file.
    pub fn new(text: &str) -> Locator {
        let mut locator = Locator::default();
        let mut in_equipment = false;
        let mut item_indent = None;
        for (number, line) in text.lines().enumerate() {
            let line_no = number + 1;
            let without_comment = line.split(" #").next().unwrap_or("");
            if without_comment.trim().is_empty() || without_comment.trim_start().starts_with('#') {
                continue;
            }
            let indent = line.len() - line.trim_start().len();
            if indent == 0 {
                in_equipment = false;
                if let Some(key) = key_of(without_comment) {
                    locator.top.push((key.to_string(), line_no));
                    in_equipment = key == "equipment";
                }
                continue;
            }
            if !in_equipment {
                continue;
            }
            let trimmed = without_comment.trim_start();
            if let Some(rest) = trimmed.strip_prefix("- ") {
                if item_indent.is_none_or(|i| indent <= i) {
                    item_indent = Some(indent);
                    locator.items.push((line_no, Vec::new()));
                    if let Some(key) = key_of(rest) {
                        let column = indent + 3;
                        if let Some(item) = locator.items.last_mut() {
                            item.1.push((key.to_string(), line_no, column));
                        }
                    }
                    continue;
                }
            }
            if let (Some(key), Some(item)) = (key_of(without_comment), locator.items.last_mut()) {
                item.1.push((key.to_string(), line_no, indent + 1));
            }
        }
        locator
    }

    /// Line and column of `key` in equipment item `index`, or of the item itself.
    pub fn key(&self, index: usize, key: &str) -> Option<(usize, usize)> {
        let (line, keys) = self.items.get(index)?;
        keys.iter()
            .find(|(k, _, _)| k == key)
            .map(|(_, l, c)| (*l, *c))
            .or(Some((*line, 1)))
    }

    /// A key written twice at the same level of equipment item `index` (YAML would
    /// keep the last silently): the key and the (line, column) of both.
    pub fn duplicate_key(&self, index: usize) -> Option<(String, Position, Position)> {
        let (_, keys) = self.items.get(index)?;
        // The item's own keys: those at the column of its first key line's keys.
        let level = keys.iter().map(|(_, _, c)| *c).min()?;
        let own: Vec<&KeyPlace> = keys.iter().filter(|(_, _, c)| *c == level).collect();
        own.iter().enumerate().find_map(|(i, (key, line, column))| {
            own[..i]
                .iter()
                .find(|(k, _, _)| k == key)
                .map(|(_, l, c)| (key.clone(), (*l, *c), (*line, *column)))
        })
    }

    /// Line of the equipment item `index`.
    pub fn item(&self, index: usize) -> Option<(usize, usize)> {
        self.items.get(index).map(|(line, _)| (*line, 1))
    }

    /// Line of a top-level key.
    pub fn top(&self, key: &str) -> Option<(usize, usize)> {
        self.top
            .iter()
            .find(|(k, _)| k == key)
            .map(|(_, l)| (*l, 1))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn finds_items_and_keys() {
        let text = "title: x\nequipment:\n  - id: a\n    kind: feed\n    temperature: 300 K\n  - id: b   # the valve\n    kind: valve\n";
        let l = Locator::new(text);
        assert_eq!(l.key(0, "temperature"), Some((5, 5)));
        assert_eq!(l.key(1, "id"), Some((6, 5)));
        assert_eq!(l.key(1, "kind"), Some((7, 5)));
        assert_eq!(l.key(1, "missing"), Some((6, 1)));
        assert_eq!(l.top("equipment"), Some((2, 1)));
    }
}
