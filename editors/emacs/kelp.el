;;; kelp.el --- kelp experiment files with eglot  -*- lexical-binding: t; -*-
;; Load from init.el: (load "/path/to/kelp.el"). Needs eglot: built in from Emacs 29; for
;; Emacs 28 install it first (Debian: elpa-eglot; or M-x package-install RET eglot).
;; Hover is rendered when markdown-mode is installed (Debian: elpa-markdown-mode).

(define-derived-mode kelp-mode prog-mode "kelp"
  "Major mode for kelp experiment files."
  (setq-local comment-start "# ")
  (setq-local comment-start-skip "#+\\s-*")
  (modify-syntax-entry ?# "<" kelp-mode-syntax-table)
  (modify-syntax-entry ?\n ">" kelp-mode-syntax-table))
(add-to-list 'auto-mode-alist '("\\.kelp\\'" . kelp-mode))

(defun kelp-project-find (dir)
  "Project of a kelp file in DIR when its nearest marker is a `.kelp' file or folder.
A nearer `.git' is left to version control; no marker at all gives eglot's default,
the file's own folder."
  (when (derived-mode-p 'kelp-mode)
    (let ((root (locate-dominating-file
                 dir (lambda (d) (or (file-exists-p (expand-file-name ".kelp" d))
                                     (file-exists-p (expand-file-name ".git" d)))))))
      (when (and root (file-exists-p (expand-file-name ".kelp" root)))
        (cons 'transient (file-name-as-directory (expand-file-name root)))))))
(add-hook 'project-find-functions #'kelp-project-find)

(with-eval-after-load 'eglot
  (add-to-list 'eglot-server-programs '(kelp-mode . ("kelp" "lsp"))))
(add-hook 'kelp-mode-hook #'eglot-ensure)
;;; kelp.el ends here
