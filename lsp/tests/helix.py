"""The shipped editors/helix/languages.toml, read as Helix would: no Helix release is packaged
by Debian 12 (bookworm), so this checks the file against the configuration schema of the
minimum documented version, Helix 23.10. Run: python3 lsp/tests/helix.py (needs Python 3.11+)."""

import pathlib
import tomllib
import unittest

SHIPPED = pathlib.Path(__file__).resolve().parents[2] / "editors" / "helix" / "languages.toml"

# Keys of a [[language]] entry that Helix 23.05 accepts (its deny_unknown_fields error lists
# them, helix-editor/helix issue 8045), less `language-server` and `config`, which 23.10
# replaced by the [language-server.NAME] table and `language-servers` (helix PR 2507).
LANGUAGE_KEYS_23_10 = {
    "name", "scope", "file-types", "shebangs", "roots", "comment-token", "text-width", "soft-wrap",
    "auto-format", "formatter", "diagnostic-severity", "grammar", "injection-regex", "indent",
    "debugger", "auto-pairs", "rulers", "workspace-lsp-roots", "language-servers",
}
SERVER_KEYS_23_10 = {"command", "args", "environment", "config", "timeout"}


class ShippedLanguagesToml(unittest.TestCase):
    def setUp(self):
        self.config = tomllib.loads(SHIPPED.read_text())

    def test_only_helix_tables(self):
        self.assertEqual(set(self.config), {"language-server", "language"})

    def test_server_runs_kelp_lsp(self):
        server = self.config["language-server"]["kelp"]
        self.assertLessEqual(set(server), SERVER_KEYS_23_10)
        self.assertEqual([server["command"], *server["args"]], ["kelp", "lsp"])

    def test_language_entry(self):
        (kelp,) = [entry for entry in self.config["language"] if entry["name"] == "kelp"]
        self.assertLessEqual(set(kelp), LANGUAGE_KEYS_23_10)
        self.assertEqual(kelp["file-types"], ["kelp"])
        self.assertEqual(kelp["comment-token"], "#")  # LANGUAGE.md: comments start with `#`
        self.assertIn(".kelp", kelp["roots"])
        self.assertEqual(kelp["language-servers"], ["kelp"])
        self.assertTrue(1 <= kelp["indent"]["tab-width"] <= 16)  # Helix rejects other widths (helix-core syntax.rs, deserialize_tab_width)


if __name__ == "__main__":
    unittest.main()
