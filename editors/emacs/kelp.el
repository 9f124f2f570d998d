;;; kelp.el --- kelp experiment files with eglot  -*- lexical-binding: t; -*-
;; Add to init.el (Emacs 29 ships eglot).
(define-derived-mode kelp-mode prog-mode "kelp"
  "Major mode for kelp experiment files."
  (setq-local comment-start "# ")
  (setq-local comment-start-skip "#+\\s-*")
  (modify-syntax-entry ?# "<" kelp-mode-syntax-table)
  (modify-syntax-entry ?\n ">" kelp-mode-syntax-table))
(add-to-list 'auto-mode-alist '("\\.kelp\\'" . kelp-mode))
(with-eval-after-load 'eglot
  (add-to-list 'eglot-server-programs '(kelp-mode . ("kelp" "lsp"))))
(add-hook 'kelp-mode-hook #'eglot-ensure)
;;; kelp.el ends here
