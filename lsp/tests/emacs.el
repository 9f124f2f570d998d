;;; emacs.el --- acts as a user in batch Emacs with the shipped editors/emacs/kelp.el  -*- lexical-binding: t; -*-
;; lsp/tests/emacs.rs runs: emacs --batch -l emacs.el. Environment: KELP_INIT (the user's
;; init.el, which only loads the shipped kelp.el), KELP_A (an experiment with a false
;; claim), KELP_B (one with a Riemann matrix, same project), KELP_OUT (JSON written here).
(require 'json)
(require 'cl-lib)

;; What an interactive startup does before init.el: activate installed packages (eglot
;; and markdown-mode on Emacs 28), then load the user's init file.
(package-activate-all)
(load (getenv "KELP_INIT") nil t)

(defun kelp-test-wait (pred seconds)
  "Let timers and process output run until PRED holds or SECONDS pass."
  (let ((end (+ (float-time) seconds)))
    (while (and (not (funcall pred)) (< (float-time) end))
      (accept-process-output nil 0.05))
    (funcall pred)))

(defun kelp-test-open (file)
  "Visit FILE as a user would; batch Emacs has no command loop, so run the
post-command hook where eglot-ensure connects."
  (find-file file)
  (run-hooks 'post-command-hook)
  (kelp-test-wait (lambda () (and (eglot-current-server) eglot--managed-mode)) 10))

(let ((result (list)) server)
  (kelp-test-open (getenv "KELP_A"))
  (setq server (eglot-current-server))
  (push (cons 'mode (symbol-name major-mode)) result)
  (push (cons 'connected (and server t)) result)
  (when server
    (let ((caps (eglot-client-capabilities server)))
      (push (cons 'snippetSupport
                  (plist-get (plist-get (plist-get (plist-get caps :textDocument) :completion)
                                        :completionItem)
                             :snippetSupport))
            result)
      (push (cons 'hoverFormats
                  (plist-get (plist-get (plist-get caps :textDocument) :hover) :contentFormat))
            result))
    (push (cons 'root (project-root (eglot--project server))) result)
    ;; Diagnostics as flymake shows them: "<source> [<code>]: <message>".
    (kelp-test-wait
     (lambda () (cl-some (lambda (d) (string-match-p "K701" (flymake-diagnostic-text d)))
                         (flymake-diagnostics)))
     20)
    (push (cons 'diagnostics
                (vconcat (mapcar (lambda (d)
                                   (list (cons 'line (1- (line-number-at-pos (flymake-diagnostic-beg d))))
                                         (cons 'text (flymake-diagnostic-text d))))
                                 (flymake-diagnostics))))
          result)
    ;; Second file of the same project: the same server.
    (kelp-test-open (getenv "KELP_B"))
    (push (cons 'sameServer (eq server (eglot-current-server))) result)
    (push (cons 'servers (length (gethash (eglot--project server) eglot--servers-by-project))) result)
    ;; Hover on `tw` of `let tw = tau(shell)` (line 5) through eglot's eldoc function,
    ;; which is what `C-h .` and eldoc show; retried until the value is computed.
    (goto-char (point-min))
    (forward-line 4)
    (forward-char 5)
    (let (hover)
      (kelp-test-wait
       (lambda ()
         (let (got)
           (eglot-hover-eldoc-function (lambda (info &rest _) (setq got (or info ""))))
           (kelp-test-wait (lambda () got) 5)
           (setq hover got)
           (and hover (string-match-p "1\\.0678" hover))))
       20)
      (setq hover (or hover ""))
      (push (cons 'hover (substring-no-properties hover)) result)
      ;; What the reader sees: markdown-mode marks markup (`**`, fences) invisible.
      (push (cons 'hoverVisible
                  (apply #'string (cl-loop for i below (length hover)
                                           unless (get-text-property i 'invisible hover)
                                           collect (aref hover i))))
            result)))
  (with-temp-file (getenv "KELP_OUT")
    (insert (json-encode result)))
  (kill-emacs 0))
;;; emacs.el ends here
