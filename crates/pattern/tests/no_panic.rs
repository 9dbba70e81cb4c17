//! Any text, however broken, gives a pattern or an error whose span lies inside it.

use proptest::prelude::*;

fn check(text: &str) {
    match pattern::Pattern::parse(text) {
        Ok(p) => assert!(!p.is_empty()),
        Err(e) => {
            assert!(e.start <= e.end && e.end <= text.len(), "{e:?}");
            assert!(!e.to_string().is_empty());
        }
    }
}

proptest! {
    #[test]
    fn pattern_alphabet_never_panics(text in "[\\[\\]()CcNnOoSsHhDXRr*aA#$!&,;:=~@%+\\-0-9.]{0,40}") {
        check(&text);
    }

    #[test]
    fn any_text_never_panics(text in "\\PC{0,30}") {
        check(&text);
    }
}
