;;; emacs_probe.el --- Emacs + eglot as an LSP client of the eigenlens server  -*- lexical-binding: t -*-
;; Opens one file, waits for diagnostics, asks for hover and code lenses at one position and
;; writes what came back as JSON.  Inputs from the environment (no quoting needed):
;;   EL_SERVER_JSON (JSON array: server command line), EL_FILE, EL_MODE (major mode),
;;   EL_LANG (languageId), EL_LINE / EL_COL (0-based LSP position), EL_OUT, EL_WAIT_S.
(require 'eglot)
(require 'json)
(require 'cl-lib)

(defvar el-probe-diagnostics nil "Every publishDiagnostics received, newest first.")

(defun el-probe-record (_server method &rest params)
  "Keep a copy of every publishDiagnostics before eglot hands it to flymake."
  (when (eq method 'textDocument/publishDiagnostics)
    (push (list :uri (plist-get params :uri) :diagnostics (or (plist-get params :diagnostics) []))
          el-probe-diagnostics)))
(advice-add 'eglot-handle-notification :before #'el-probe-record)

(defun el-probe-wait (seconds done-p)
  "Let the server talk for up to SECONDS or until DONE-P returns non-nil."
  (let ((deadline (+ (float-time) seconds)))
    (while (and (not (funcall done-p)) (< (float-time) deadline))
      (accept-process-output nil 0.05))
    (funcall done-p)))

(let* ((wait (string-to-number (or (getenv "EL_WAIT_S") "15")))
       (errors nil)
       (result (list :attached :json-false)))
  (condition-case err
      (let* ((file (getenv "EL_FILE"))
             (command (append (json-read-from-string (getenv "EL_SERVER_JSON")) nil))
             (mode (intern (getenv "EL_MODE")))
             (eglot-sync-connect t)
             (eglot-autoreconnect nil))
        ;; The file's folder is the project, VC or not, so eglot manages (didOpen) its buffer.
        (add-hook 'project-find-functions
                  (lambda (_dir) (cons 'transient (file-name-directory file))))
        (find-file file)
        (unless (fboundp mode) (define-derived-mode el-probe-mode prog-mode "probe") (setq mode 'el-probe-mode))
        (funcall mode)
        (let* ((project (cons 'transient (file-name-directory file)))
               (server (eglot--connect (list mode) project 'eglot-lsp-server command (getenv "EL_LANG")))
               (position (list :line (string-to-number (getenv "EL_LINE"))
                               :character (string-to-number (getenv "EL_COL"))))
               (doc (eglot--TextDocumentIdentifier)))
          (setq result (plist-put result :attached t))
          (unless (el-probe-wait wait (lambda () el-probe-diagnostics))
            (push "no diagnostics within the wait" errors))
          (setq result (plist-put result :hover
                                  (jsonrpc-request server :textDocument/hover
                                                   (list :textDocument doc :position position)
                                                   :timeout wait)))
          (setq result (plist-put result :lenses
                                  (jsonrpc-request server :textDocument/codeLens
                                                   (list :textDocument doc) :timeout wait)))
          (ignore-errors (eglot-shutdown server))))
    (error (push (format "%S" err) errors)))
  (setq result (plist-put result :diagnostics (vconcat (reverse el-probe-diagnostics))))
  (setq result (plist-put result :errors (vconcat (reverse errors))))
  (with-temp-file (getenv "EL_OUT")
    (insert (json-encode result)))
  (kill-emacs 0))
