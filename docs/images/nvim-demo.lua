-- Neovim 0.7: start dualize serve for *.prob files and attach it to the buffer.
vim.cmd('syntax off')
vim.opt.termguicolors = false
vim.opt.number = true
vim.opt.signcolumn = 'yes'
vim.opt.laststatus = 2
vim.api.nvim_create_autocmd({ 'BufRead', 'BufNewFile' }, {
  pattern = '*.prob',
  callback = function(args)
    vim.bo[args.buf].filetype = 'dualize'
    local client = vim.lsp.start_client({
      name = 'dualize',
      cmd = { 'python', '-m', 'dualize', 'serve' },
      root_dir = vim.fn.getcwd(),
    })
    vim.lsp.buf_attach_client(args.buf, client)
  end,
})
