//! The page's own sources (`www/**/*.js`, `www/**/*.html`, leaving out the generated `www/pkg*`
//! folders) use nothing that turns data into markup or code, and nothing that the page's content
//! security policy (`default-src 'self'; script-src 'self' 'wasm-unsafe-eval'`) would refuse:
//! no `innerHTML`, `outerHTML`, `insertAdjacentHTML`, `document.write`, `eval(`, `new Function`,
//! string timers, `javascript:` URLs; in HTML no inline event handler, style attribute, `<style>`
//! element, or `<script>` without `src` (JSON data blocks aside).
//!
//! The scan reads code, not comments: JavaScript `//` and `/* */` comments and HTML `<!-- -->`
//! comments are blanked first (strings are followed on each line so that `'//'` in a string is not
//! taken for a comment). It is a lint, not a parser: the browser tests check the policy itself.

use std::fs;
use std::path::{Path, PathBuf};

/// What JavaScript must not contain, with the reason shown on a failure.
const JS_FORBIDDEN: &[(&str, &str)] = &[
    ("innerHTML", "parses data as markup; use textContent and createElement"),
    ("outerHTML", "parses data as markup"),
    ("insertAdjacentHTML", "parses data as markup"),
    ("document.write", "writes markup into the document"),
    ("eval(", "runs data as code (and the CSP refuses it)"),
    ("new Function", "runs data as code (and the CSP refuses it)"),
    ("setTimeout('", "a string timer runs data as code"),
    ("setTimeout(\"", "a string timer runs data as code"),
    ("setTimeout(`", "a string timer runs data as code"),
    ("setInterval('", "a string timer runs data as code"),
    ("setInterval(\"", "a string timer runs data as code"),
    ("setInterval(`", "a string timer runs data as code"),
    ("javascript:", "a javascript: URL runs code from markup"),
];

/// Every file under `dir` whose name ends in one of `exts`, leaving out `www/pkg*` folders.
fn sources(dir: &Path, exts: &[&str], out: &mut Vec<PathBuf>) {
    let mut entries: Vec<_> = fs::read_dir(dir)
        .unwrap_or_else(|e| panic!("cannot read {}: {e}", dir.display()))
        .map(|e| e.expect("a directory entry").path())
        .collect();
    entries.sort();
    for path in entries {
        let name = path.file_name().and_then(|n| n.to_str()).unwrap_or("");
        if path.is_dir() {
            if !name.starts_with("pkg") {
                sources(&path, exts, out);
            }
        } else if exts.iter().any(|ext| name.ends_with(ext)) {
            out.push(path);
        }
    }
}

/// The text with every JavaScript comment replaced by spaces (lines and columns stay put).
/// Quotes are followed within a line only; a regular expression literal holding a quote may
/// hide the rest of its line from the scan, which errs on the side of reading more as code.
fn blank_js_comments(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    let mut in_block = false;
    for line in text.split('\n') {
        let chars: Vec<char> = line.chars().collect();
        let mut quote: Option<char> = None;
        let mut i = 0;
        while i < chars.len() {
            let c = chars[i];
            let next = chars.get(i + 1).copied();
            if in_block {
                if c == '*' && next == Some('/') {
                    in_block = false;
                    out.push_str("  ");
                    i += 2;
                } else {
                    out.push(' ');
                    i += 1;
                }
                continue;
            }
            match quote {
                Some(q) => {
                    out.push(c);
                    if c == '\\' {
                        if let Some(n) = next {
                            out.push(n);
                            i += 1;
                        }
                    } else if c == q {
                        quote = None;
                    }
                }
                None if c == '/' && next == Some('/') => {
                    out.extend(std::iter::repeat_n(' ', chars.len() - i));
                    break;
                }
                None if c == '/' && next == Some('*') => {
                    in_block = true;
                    out.push_str("  ");
                    i += 2;
                    continue;
                }
                None => {
                    if c == '\'' || c == '"' || c == '`' {
                        quote = Some(c);
                    }
                    out.push(c);
                }
            }
            i += 1;
        }
        out.push('\n');
    }
    out.pop();
    out
}

/// The text with every HTML comment replaced by spaces (newlines kept).
fn blank_html_comments(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    let mut rest = text;
    while let Some(start) = rest.find("<!--") {
        out.push_str(&rest[..start]);
        let end = rest[start..].find("-->").map_or(rest.len(), |e| start + e + 3);
        out.extend(rest[start..end].chars().map(|c| if c == '\n' { '\n' } else { ' ' }));
        rest = &rest[end..];
    }
    out.push_str(rest);
    out
}

/// 1-based line of a byte offset.
fn line_of(text: &str, offset: usize) -> usize {
    text[..offset].matches('\n').count() + 1
}

/// Findings in JavaScript code: (line, what was found, why it is refused).
fn scan_js(text: &str) -> Vec<(usize, String, &'static str)> {
    let code = blank_js_comments(text);
    let mut found = Vec::new();
    for (n, line) in code.lines().enumerate() {
        for &(needle, why) in JS_FORBIDDEN {
            for (at, _) in line.match_indices(needle) {
                // A name of its own, not the end of a longer one (`retrieval(` is no `eval(`).
                let before = line[..at].chars().next_back();
                if before.is_some_and(|b| b.is_ascii_alphanumeric() || b == '_' || b == '$') {
                    continue;
                }
                found.push((n + 1, needle.to_string(), why));
            }
        }
    }
    found
}

/// The tags of an HTML text outside comments: (byte offset, the text between `<` and `>`).
fn tags(html: &str) -> Vec<(usize, &str)> {
    let mut out = Vec::new();
    let mut from = 0;
    while let Some(lt) = html[from..].find('<') {
        let start = from + lt;
        let Some(gt) = html[start..].find('>') else { break };
        let inner = &html[start + 1..start + gt];
        if inner.starts_with(|c: char| c.is_ascii_alphabetic()) {
            out.push((start, inner));
        }
        from = start + gt + 1;
    }
    out
}

/// The names of a tag's attributes, lower case (values skipped, quoted or not).
fn attribute_names(tag: &str) -> Vec<String> {
    let chars: Vec<char> = tag.chars().collect();
    let mut names = Vec::new();
    let mut i = chars.iter().position(|c| c.is_whitespace()).unwrap_or(chars.len());
    while i < chars.len() {
        while i < chars.len() && (chars[i].is_whitespace() || chars[i] == '/') {
            i += 1;
        }
        let start = i;
        while i < chars.len() && !chars[i].is_whitespace() && chars[i] != '=' && chars[i] != '/' {
            i += 1;
        }
        if i > start {
            names.push(chars[start..i].iter().collect::<String>().to_ascii_lowercase());
        }
        while i < chars.len() && chars[i].is_whitespace() {
            i += 1;
        }
        if i < chars.len() && chars[i] == '=' {
            i += 1;
            while i < chars.len() && chars[i].is_whitespace() {
                i += 1;
            }
            if i < chars.len() && (chars[i] == '"' || chars[i] == '\'') {
                let q = chars[i];
                i += 1;
                while i < chars.len() && chars[i] != q {
                    i += 1;
                }
                i += 1;
            } else {
                while i < chars.len() && !chars[i].is_whitespace() {
                    i += 1;
                }
            }
        }
    }
    names
}

/// Findings in HTML: those of scan_js on the whole text (a `javascript:` URL, a string timer in
/// an attribute), and per tag inline handlers, style attributes, `<style>` and inline scripts.
fn scan_html(text: &str) -> Vec<(usize, String, &'static str)> {
    let html = blank_html_comments(text);
    let mut found: Vec<_> = scan_js(&html)
        .into_iter()
        .filter(|(_, needle, _)| needle == "javascript:" || needle.contains("HTML") || needle == "document.write")
        .collect();
    for (at, tag) in tags(&html) {
        let line = line_of(&html, at);
        let name: String = tag
            .chars()
            .take_while(|c| !c.is_whitespace() && *c != '/')
            .collect::<String>()
            .to_ascii_lowercase();
        let attrs = attribute_names(tag);
        for a in &attrs {
            if a.starts_with("on") && a.len() > 2 {
                found.push((line, format!("{a}="), "an inline event handler (the CSP refuses it)"));
            }
            if a == "style" {
                found.push((line, "style=".into(), "an inline style attribute (the CSP refuses it)"));
            }
        }
        if name == "style" {
            found.push((
                line,
                "<style>".into(),
                "an inline style sheet (the CSP refuses it); use a .css file",
            ));
        }
        if name == "script" && !attrs.iter().any(|a| a == "src") {
            let lower = tag.to_ascii_lowercase();
            let json = lower.contains("type=\"application/json\"") || lower.contains("type='application/json'");
            if !json {
                found.push((line, "<script> without src".into(), "inline code (the CSP refuses it)"));
            }
        }
    }
    found.sort();
    found
}

#[test]
fn the_page_sources_turn_no_data_into_markup_or_code() {
    let www = Path::new(env!("CARGO_MANIFEST_DIR")).join("www");
    let mut files = Vec::new();
    sources(&www, &[".js", ".html"], &mut files);
    let names: Vec<String> = files
        .iter()
        .map(|f| f.strip_prefix(&www).unwrap().display().to_string())
        .collect();
    for must in [
        "app.js",
        "dom.js",
        "format.js",
        "field-error.js",
        "state.js",
        "results.js",
        "views.js",
        "design-panel.js",
        "design-results.js",
        "export.js",
        "index.html",
        "embed.js",
        "embed.html",
        "design-worker.js",
    ] {
        assert!(
            names.iter().any(|n| n == must),
            "www/{must} is scanned; scanned: {names:?}"
        );
    }
    let mut failures = Vec::new();
    for (file, name) in files.iter().zip(&names) {
        let text = fs::read_to_string(file).unwrap_or_else(|e| panic!("cannot read {}: {e}", file.display()));
        let found = if name.ends_with(".html") {
            scan_html(&text)
        } else {
            scan_js(&text)
        };
        for (line, what, why) in found {
            failures.push(format!("www/{name}:{line}: {what}: {why}"));
        }
    }
    assert!(
        failures.is_empty(),
        "{} finding(s):\n{}",
        failures.len(),
        failures.join("\n")
    );
}

#[test]
fn the_scan_finds_code_and_leaves_comments_and_strings_alone() {
    let lines = |found: Vec<(usize, String, &str)>| found.into_iter().map(|(l, w, _)| (l, w)).collect::<Vec<_>>();
    let js = "el.innerHTML = x;\n// never innerHTML\nconst u = 'http://x'; el.outerHTML = y;\n/* eval(x)\n  eval(y) */ retrieval(z);\nwindow.eval(s); new Function('a');\nsetTimeout(\"f()\", 1); setTimeout(() => 0, 1);\nconst s = '/* not a comment */'; document.write(s);";
    assert_eq!(
        lines(scan_js(js)),
        vec![
            (1, "innerHTML".into()),
            (3, "outerHTML".into()),
            (6, "eval(".into()),
            (6, "new Function".into()),
            (7, "setTimeout(\"".into()),
            (8, "document.write".into()),
        ]
    );
    let html = "<button onclick=\"go()\">x</button>\n<!-- <script>alert(1)</script> -->\n<script type=\"module\" src=\"app.js\"></script>\n<script type=\"application/json\">{}</script>\n<script>run()</script>\n<a href=\"javascript:void 0\" data-on=\"1\">a</a>\n<p style='color: red'>p</p><style>p {}</style>";
    assert_eq!(
        lines(scan_html(html)),
        vec![
            (1, "onclick=".into()),
            (5, "<script> without src".into()),
            (6, "javascript:".into()),
            (7, "<style>".into()),
            (7, "style=".into()),
        ]
    );
}

#[test]
fn the_page_offers_every_catalogued_nematic() {
    // The page's one list of nematics (www/state.js, `NEMATICS`, used by the stack editor and the
    // design panel) is written out by hand; it must name every key of the catalogue
    // (src/optics/lc/catalogue.rs).
    let www = Path::new(env!("CARGO_MANIFEST_DIR")).join("www");
    for file in ["state.js"] {
        let text = fs::read_to_string(www.join(file)).unwrap_or_else(|e| panic!("cannot read {file}: {e}"));
        for key in doublespar::nematic_keys() {
            assert!(
                text.contains(&format!("['{key}', ")),
                "www/{file} does not offer the catalogued nematic {key}"
            );
        }
    }
}
