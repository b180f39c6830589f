" Vim syntax for avow study files (*.avow).
" Install: copy the ftdetect/, syntax/ and indent/ folders into ~/.vim/ (or a pack
" directory); `make install` puts them in share/vim/vimfiles.
if exists("b:current_syntax")
  finish
endif

" The keywords are those of grammar/lexer.re in avow's sources; tests/keywords.sh checks
" that these lists agree with it.
syn keyword avowStatement study response factor data alpha adjust orthogonal contrast explore plan variances block interactions
syn keyword avowKeyword   unit at code from missing sha256 delimiter pairs versus within replicates sigma detect power seed
syn keyword avowFunction  mean trend
syn keyword avowMethod    none bonferroni holm sidak scheffe fdr
" cell and interaction are functions only before "(": elsewhere they are names.
syn match   avowFunction  "\<\(cell\|interaction\)\ze\s*("
" A level reference: factor.level.
syn match   avowLevelRef  "\<\h\w*\.\h\w*\>"
syn match   avowNumber    "\<\d\+\(\.\d\+\)\=\([eE][+-]\=\d\+\)\=\>"
syn match   avowEscape    contained "\\[\"\\nt]"
syn region  avowString    start=+"+ skip=+\\\\\|\\"+ end=+"+ oneline contains=avowEscape
syn match   avowComment   "#.*$" contains=@Spell
syn match   avowOperator  "[-+*/=<>]"

hi def link avowStatement Statement
hi def link avowKeyword   Keyword
hi def link avowFunction  Function
hi def link avowMethod    Constant
hi def link avowLevelRef  Identifier
hi def link avowNumber    Number
hi def link avowString    String
hi def link avowEscape    SpecialChar
hi def link avowComment   Comment
hi def link avowOperator  Operator

let b:current_syntax = "avow"
