-- Headless Neovim (0.7+) as an LSP client of the eigenlens server: opens one file, waits for
-- diagnostics, asks for hover and code lenses at one position, writes what came back as JSON.
-- Inputs come from the environment so the script needs no quoting:
--   EL_SERVER_JSON  JSON array: the server command line
--   EL_FILE         file to open;  EL_LANG  languageId (buffer filetype)
--   EL_LINE, EL_COL 0-based LSP position of the hover
--   EL_OUT          where to write the JSON result
--   EL_WAIT_MS      how long to wait for each answer
local out = { diagnostics = {}, errors = {}, hover = vim.NIL, lenses = vim.NIL, attached = false }
local wait_ms = tonumber(vim.env.EL_WAIT_MS or '15000')

local function finish()
  local f = io.open(vim.env.EL_OUT, 'w')
  f:write(vim.fn.json_encode(out))
  f:close()
  vim.cmd('qall!')
end

local ok, err = pcall(function()
  vim.cmd('edit ' .. vim.fn.fnameescape(vim.env.EL_FILE))
  local bufnr = vim.api.nvim_get_current_buf()
  vim.bo[bufnr].filetype = vim.env.EL_LANG
  local client_id = vim.lsp.start_client({
    name = 'eigenlens',
    cmd = vim.fn.json_decode(vim.env.EL_SERVER_JSON),
    root_dir = vim.fn.fnamemodify(vim.env.EL_FILE, ':p:h'),
    settings = { eigenlens = {} },
    handlers = {
      ['textDocument/publishDiagnostics'] = function(_, result)
        table.insert(out.diagnostics, result)
      end,
    },
    on_error = function(code, e)
      table.insert(out.errors, 'client error ' .. tostring(code) .. ': ' .. vim.inspect(e))
    end,
  })
  if not client_id then
    table.insert(out.errors, 'start_client returned nil')
    return
  end
  out.attached = vim.lsp.buf_attach_client(bufnr, client_id)
  local client = vim.lsp.get_client_by_id(client_id)
  vim.wait(wait_ms, function() return client.initialized or client.is_stopped() end, 20)
  if not client.initialized then
    table.insert(out.errors, 'server did not initialize within ' .. wait_ms .. ' ms')
    return
  end
  out.capabilities = client.server_capabilities or client.resolved_capabilities
  vim.wait(wait_ms, function() return #out.diagnostics > 0 end, 20)

  local position = { line = tonumber(vim.env.EL_LINE), character = tonumber(vim.env.EL_COL) }
  local doc = { uri = vim.uri_from_bufnr(bufnr) }
  local function ask(method, params, key)
    local done = false
    client.request(method, params, function(e, result)
      if e then table.insert(out.errors, method .. ': ' .. vim.inspect(e)) end
      out[key] = result == nil and vim.NIL or result
      done = true
    end, bufnr)
    if not vim.wait(wait_ms, function() return done end, 20) then
      table.insert(out.errors, method .. ': no answer within ' .. wait_ms .. ' ms')
    end
  end
  ask('textDocument/hover', { textDocument = doc, position = position }, 'hover')
  ask('textDocument/codeLens', { textDocument = doc }, 'lenses')
  client.stop()
  vim.wait(2000, function() return client.is_stopped() end, 20)
end)
if not ok then table.insert(out.errors, 'lua: ' .. tostring(err)) end
finish()
