;;; avow-mode.el --- Major mode for avow study files  -*- lexical-binding: t; -*-

;; Version: 0.1.0
;; Keywords: languages
;; Package-Requires: ((emacs "25.1"))

;;; Commentary:

;; A major mode for the study files of avow, the tool for designed experiments
;; (*.avow): highlighting of keywords, strings, numbers, comments (# to the end
;; of the line) and level references such as factor.level, and indentation of
;; { } blocks by four spaces, as `avow fmt' writes them.
;;
;; Install: put this file in a folder of `load-path' (make install puts it in
;; share/emacs/site-lisp) and add to your init file:
;;
;;   (autoload 'avow-mode "avow-mode" "Major mode for avow study files." t)
;;   (add-to-list 'auto-mode-alist '("\\.avow\\'" . avow-mode))
;;
;; or simply (require 'avow-mode).  M-x compile with "avow check FILE" reads
;; the diagnostics, which have the FILE:LINE:COL: form.

;;; Code:

(defgroup avow nil
  "Editing avow study files."
  :group 'languages
  :prefix "avow-")

(defcustom avow-indent-offset 4
  "Columns by which the contents of a { } block are indented."
  :type 'integer
  :safe #'integerp
  :group 'avow)

;; The keywords are those of the language's lexer (grammar/lexer.re in avow's
;; sources); tests/keywords.sh checks that these lists agree with it.

(defconst avow-mode-statement-keywords
  '("study" "response" "factor" "block" "interactions" "data" "alpha" "adjust"
    "orthogonal" "variances" "contrast" "explore" "plan")
  "Keywords that begin a statement of a study file.")

(defconst avow-mode-other-keywords
  '("unit" "at" "code" "from" "missing" "sha256" "delimiter" "pairs" "versus"
    "within" "replicates" "sigma" "detect" "power" "seed")
  "Keywords inside statements and blocks.")

(defconst avow-mode-functions
  '("mean" "trend")
  "Functions of contrast expressions that are keywords.")

(defconst avow-mode-name-functions
  '("cell" "interaction")
  "Functions of contrast expressions that are names elsewhere.")

(defconst avow-mode-methods
  '("none" "bonferroni" "holm" "sidak" "scheffe" "fdr")
  "Adjustment methods.")

(defconst avow-mode--name "[A-Za-z_][A-Za-z0-9_]*"
  "A name of the language.")

(defconst avow-mode-font-lock-keywords
  `((,(regexp-opt avow-mode-statement-keywords 'symbols) . font-lock-keyword-face)
    (,(regexp-opt avow-mode-other-keywords 'symbols) . font-lock-keyword-face)
    (,(regexp-opt avow-mode-functions 'symbols) . font-lock-builtin-face)
    (,(concat (regexp-opt avow-mode-name-functions 'symbols) "[ \t]*(")
     1 font-lock-builtin-face)
    (,(regexp-opt avow-mode-methods 'symbols) . font-lock-constant-face)
    ;; The name a statement declares: factor NAME, contrast NAME, ...
    (,(concat "\\_<\\(?:factor\\|block\\|response\\|contrast\\)[ \t]+\\("
              avow-mode--name "\\)")
     1 font-lock-function-name-face)
    ;; A level reference: factor.level.
    (,(concat "\\_<\\(" avow-mode--name "\\)\\(\\.\\)\\(" avow-mode--name "\\)\\_>")
     (1 font-lock-type-face)
     (3 font-lock-variable-name-face))
    ;; Numbers: 2, 0.05, 1e-3.
    ("\\_<[0-9]+\\(?:\\.[0-9]+\\)?\\(?:[eE][-+]?[0-9]+\\)?\\_>" . font-lock-constant-face))
  "Highlighting of avow study files.")

(defvar avow-mode-syntax-table
  (let ((table (make-syntax-table)))
    (modify-syntax-entry ?# "<" table)
    (modify-syntax-entry ?\n ">" table)
    (modify-syntax-entry ?\" "\"" table)
    (modify-syntax-entry ?\\ "\\" table)
    (modify-syntax-entry ?_ "_" table)
    (modify-syntax-entry ?. "." table)
    (modify-syntax-entry ?' "." table)
    (dolist (c '(?+ ?- ?* ?/ ?= ?< ?> ?,))
      (modify-syntax-entry c "." table))
    table)
  "Syntax table of `avow-mode'.")

(defun avow-mode--block-depth (pos)
  "The number of { } blocks open at POS, outside strings and comments."
  (let ((depth 0))
    (dolist (open (nth 9 (syntax-ppss pos)))
      (when (eq (char-after open) ?{)
        (setq depth (1+ depth))))
    depth))

(defun avow-indent-line ()
  "Indent the current line by `avow-indent-offset' per enclosing block."
  (interactive)
  (let* ((bol (line-beginning-position))
         (depth (avow-mode--block-depth bol))
         (closing (save-excursion
                    (back-to-indentation)
                    (and (eq (char-after) ?})
                         (not (nth 8 (syntax-ppss))))))
         (column (* avow-indent-offset (max 0 (if closing (1- depth) depth))))
         (offset (- (current-column) (current-indentation))))
    (indent-line-to column)
    (when (> offset 0)
      (move-to-column (+ column offset)))))

;;;###autoload
(define-derived-mode avow-mode prog-mode "avow"
  "Major mode for avow study files.

\\{avow-mode-map}"
  :syntax-table avow-mode-syntax-table
  :group 'avow
  (setq-local comment-start "# ")
  (setq-local comment-end "")
  (setq-local comment-start-skip "#+[ \t]*")
  (setq-local font-lock-defaults '(avow-mode-font-lock-keywords))
  (setq-local indent-line-function #'avow-indent-line)
  (setq-local indent-tabs-mode nil)
  (setq-local electric-indent-chars (append '(?{ ?}) electric-indent-chars)))

;;;###autoload
(add-to-list 'auto-mode-alist '("\\.avow\\'" . avow-mode))

(provide 'avow-mode)

;;; avow-mode.el ends here
