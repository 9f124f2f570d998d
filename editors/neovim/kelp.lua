-- kelp experiment files in Neovim 0.7 or newer: `dofile` this file from init.lua (or paste it there).
-- One `kelp lsp` serves each project root: the nearest folder holding `.git` or a `.kelp`
-- marker (file or folder), else the file's own folder.

-- Filetype by autocmd: Neovim 0.7 ignores `vim.filetype.add` unless g:do_filetype_lua is set.
vim.api.nvim_create_autocmd({ "BufRead", "BufNewFile" }, {
  pattern = "*.kelp",
  callback = function(args)
    vim.bo[args.buf].filetype = "kelp"
  end,
})

local function project_root(path)
  local dir = vim.fn.fnamemodify(path, ":p:h")
  while true do
    for _, marker in ipairs({ ".git", ".kelp" }) do
      -- `.kelp` next to the file itself is the marker only when it is not the file being opened.
      local candidate = dir .. "/" .. marker
      if candidate ~= path and vim.loop.fs_stat(candidate) then
        return dir
      end
    end
    local parent = vim.fn.fnamemodify(dir, ":h")
    if parent == dir then
      return vim.fn.fnamemodify(path, ":p:h")
    end
    dir = parent
  end
end

-- Client ids by root, for Neovim 0.7 (vim.lsp.start, from 0.8, reuses clients itself).
local clients = {}

local function attach(buf, root)
  local config = { name = "kelp", cmd = { "kelp", "lsp" }, root_dir = root }
  if vim.lsp.start then
    vim.lsp.start(config, { bufnr = buf })
    return
  end
  local id = clients[root]
  local client = id and vim.lsp.get_client_by_id(id)
  if not client or client.is_stopped() then
    id = vim.lsp.start_client(config)
    clients[root] = id
  end
  if id then
    vim.lsp.buf_attach_client(buf, id)
  end
end

vim.api.nvim_create_autocmd("FileType", {
  pattern = "kelp",
  callback = function(args)
    vim.bo[args.buf].commentstring = "# %s"
    local path = vim.api.nvim_buf_get_name(args.buf)
    if path ~= "" then
      attach(args.buf, project_root(vim.fn.fnamemodify(path, ":p")))
    end
    -- Neovim 0.10 maps K to hover itself; before that K runs 'keywordprg' (man).
    if vim.fn.has("nvim-0.10") == 0 then
      vim.keymap.set("n", "K", vim.lsp.buf.hover, { buffer = args.buf, desc = "kelp: hover" })
    end
  end,
})
