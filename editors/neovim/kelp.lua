-- kelp experiment files in Neovim (0.7 or newer): copy into init.lua, or `dofile` it.
vim.filetype.add({ extension = { kelp = "kelp" } })

vim.api.nvim_create_autocmd("FileType", {
  pattern = "kelp",
  callback = function(args)
    local root = vim.fs and vim.fs.dirname(vim.fs.find({ ".git" }, { upward = true })[1] or "")
    local id = vim.lsp.start_client({
      name = "kelp",
      cmd = { "kelp", "lsp" },
      root_dir = root ~= "" and root or vim.fn.getcwd(),
    })
    if id then
      vim.lsp.buf_attach_client(args.buf, id)
    end
    vim.bo[args.buf].commentstring = "# %s"
  end,
})
