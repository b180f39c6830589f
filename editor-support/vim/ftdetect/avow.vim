" avow study files
autocmd BufRead,BufNewFile *.avow setfiletype avow
