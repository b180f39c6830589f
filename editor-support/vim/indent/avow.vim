" Vim indent file for avow study files (*.avow): the contents of a { } block are
" indented by four spaces, as `avow fmt` writes them; a line that begins with } goes
" back to the indent of its block's statement. Braces inside strings and comments do
" not count.
" Install: copy into ~/.vim/indent/ (or a pack directory) with ftdetect/ and syntax/.
if exists("b:did_indent")
  finish
endif
let b:did_indent = 1

setlocal indentexpr=GetAvowIndent(v:lnum)
setlocal indentkeys=0{,0},0#,!^F,o,O
setlocal autoindent nolisp nosmartindent nocindent
let b:undo_indent = "setlocal indentexpr< indentkeys< autoindent< lisp< smartindent< cindent<"

if exists("*GetAvowIndent")
  finish
endif
let s:cpo_save = &cpo
set cpo&vim

" The indent step of the canonical form.
let s:step = 4

" A line without its strings and its comment.
function! s:Code(line) abort
  let l = substitute(a:line, '"\%(\\.\|[^"\\]\)*"\=', '""', 'g')
  return substitute(l, '#.*$', '', '')
endfunction

function! s:Count(text, char) abort
  return len(substitute(a:text, '[^' . a:char . ']', '', 'g'))
endfunction

function! GetAvowIndent(lnum) abort
  let prev = prevnonblank(a:lnum - 1)
  if prev == 0
    return 0
  endif
  let pcode = s:Code(getline(prev))
  let depth = s:Count(pcode, '{') - s:Count(pcode, '}')
  " A leading } of the previous line already took its line back one step.
  if pcode =~ '^\s*}'
    let depth += 1
  endif
  let ind = indent(prev) + s:step * depth
  if s:Code(getline(a:lnum)) =~ '^\s*}'
    let ind -= s:step
  endif
  return ind < 0 ? 0 : ind
endfunction

let &cpo = s:cpo_save
unlet s:cpo_save
